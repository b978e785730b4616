/**
 * Where to go after signing in: only a path on this site, so a crafted sign-in link cannot bounce
 * someone to another site. Refused, giving `fallback`:
 *   - anything not starting with "/";
 *   - "//host" and any backslash ("/\host"): browsers read both as protocol-relative addresses;
 *   - control characters: browsers drop tabs and newlines, so "/\t/host" would become "//host";
 *   - the sign-in page itself, which would only ask to sign in again;
 *   - more than 500 characters (it is kept in the session).
 */
export const MAX_RETURN_TO_LENGTH = 500;

// biome-ignore lint/suspicious/noControlCharactersInRegex: refusing control characters is the point.
const CONTROL_CHARACTERS = /[\u0000-\u001f\u007f]/;

export function safeReturnTo(value: unknown, fallback = "/"): string {
  if (typeof value !== "string" || !value.startsWith("/")) return fallback;
  if (value.startsWith("//") || value.includes("\\") || CONTROL_CHARACTERS.test(value)) return fallback;
  if (value.startsWith("/signin")) return fallback;
  if (value.length > MAX_RETURN_TO_LENGTH) return fallback;
  return value;
}
