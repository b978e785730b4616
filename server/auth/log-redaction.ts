/**
 * Request logs keep the path but not the credentials a sign-in carries in its query: the provider sends
 * the authorization code (and state) to the callback in the URL, and a code is a credential until used.
 */

const SECRET_QUERY_PARAMETERS = new Set([
  "code",
  "state",
  "id_token",
  "access_token",
  "refresh_token",
  "code_verifier",
]);
const REDACTED = "[redacted]";

/** The URL with the values of credential parameters replaced; other parameters are kept as sent. */
export function redactUrl(url: string): string {
  const question = url.indexOf("?");
  if (question < 0) return url;
  const query = url
    .slice(question + 1)
    .split("&")
    .map((pair) => {
      const name = pair.split("=", 1)[0] ?? "";
      return SECRET_QUERY_PARAMETERS.has(decodeURIComponentSafe(name)) ? `${name}=${REDACTED}` : pair;
    })
    .join("&");
  return `${url.slice(0, question)}?${query}`;
}

function decodeURIComponentSafe(value: string): string {
  try {
    return decodeURIComponent(value);
  } catch {
    return value;
  }
}

type SerializedRequest = { url?: unknown; query?: unknown };

/** pino-http request serializer (it receives the standard serialization of the request). */
export function redactRequest<T extends SerializedRequest>(req: T): T {
  const query =
    req.query && typeof req.query === "object"
      ? Object.fromEntries(
          Object.entries(req.query).map(([name, value]) => [
            name,
            SECRET_QUERY_PARAMETERS.has(name) ? REDACTED : value,
          ]),
        )
      : req.query;
  return { ...req, url: typeof req.url === "string" ? redactUrl(req.url) : req.url, query };
}
