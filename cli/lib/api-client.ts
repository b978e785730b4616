/**
 * The command line's client of the Sigmaflow HTTP API: where the server is and which API token to send
 * come from the environment (`SIGMAFLOW_URL`, `SIGMAFLOW_TOKEN`); every response is parsed with the zod
 * contract of `shared/schemas`, and every failure becomes a `CliError` a researcher can act on.
 */
import type { z } from "zod";
import { apiErrorSchema } from "../../shared/schemas/common";
import { CliError } from "../errors";

/** Exit code when the server cannot be reached or answers with an error (2 stays for bad usage). */
export const API_FAILURE_EXIT_CODE = 4;

/** Time one request may take before it is given up (the server answers reads in milliseconds). */
const REQUEST_TIMEOUT_MS = 30_000;
/** Largest response body read; a runs list or a log page is far below this. */
const MAX_RESPONSE_BYTES = 64 * 1024 * 1024;

export const TOKEN_REFUSED_MESSAGE = "the token was refused (revoked or mistyped?): check SIGMAFLOW_TOKEN.";

export type ApiConfig = { baseUrl: string; token: string };

/**
 * Reads `SIGMAFLOW_URL` and `SIGMAFLOW_TOKEN`.
 *
 * @param env - the environment (process.env)
 * @returns the server's base URL without a trailing slash, and the token
 * @throws CliError naming the variable that is missing or malformed
 */
export function apiConfigFromEnv(env: NodeJS.ProcessEnv): ApiConfig {
  const rawUrl = env.SIGMAFLOW_URL?.trim();
  if (!rawUrl) {
    throw new CliError(
      "SIGMAFLOW_URL is not set: set it to the address of your Sigmaflow server, e.g. " +
        "export SIGMAFLOW_URL=http://127.0.0.1:5180",
    );
  }
  let url: URL;
  try {
    url = new URL(rawUrl);
  } catch {
    throw new CliError(`SIGMAFLOW_URL "${rawUrl}" is not a URL (expected e.g. http://127.0.0.1:5180).`);
  }
  if (url.protocol !== "http:" && url.protocol !== "https:") {
    throw new CliError(`SIGMAFLOW_URL must start with http:// or https://, got "${rawUrl}".`);
  }
  const token = env.SIGMAFLOW_TOKEN?.trim();
  if (!token) {
    throw new CliError(
      "SIGMAFLOW_TOKEN is not set: create an API token in Sigmaflow (your profile, API tokens) and " +
        "export SIGMAFLOW_TOKEN=sf_…",
    );
  }
  if (!token.startsWith("sf_") || /\s/.test(token)) {
    throw new CliError('SIGMAFLOW_TOKEN does not look like a Sigmaflow API token (they start with "sf_").');
  }
  return { baseUrl: url.href.replace(/\/+$/, ""), token };
}

export type ApiClient = {
  readonly config: ApiConfig;
  /** GET or POST a JSON endpoint under the base URL (`/api/...`) and parse the answer with `schema`. */
  request<S extends z.ZodType>(method: "GET" | "POST", path: string, schema: S): Promise<z.infer<S>>;
};

function describeNetworkError(error: unknown): string {
  const cause = (error as { cause?: { code?: string; message?: string } }).cause;
  if ((error as Error).name === "TimeoutError") return `no answer within ${REQUEST_TIMEOUT_MS / 1000} s`;
  return cause?.code ?? cause?.message ?? (error as Error).message;
}

/** The message of an error answer: the API's `{ error: { message } }` when it has one. */
function errorMessage(status: number, text: string): string {
  try {
    const parsed = apiErrorSchema.safeParse(JSON.parse(text));
    if (parsed.success) return parsed.data.error.message;
  } catch {}
  return `the server answered ${status}`;
}

async function readBounded(response: Response): Promise<string> {
  const declared = Number(response.headers.get("content-length") ?? "0");
  if (declared > MAX_RESPONSE_BYTES) {
    await response.body?.cancel();
    throw new CliError(
      `the server's answer is larger than ${MAX_RESPONSE_BYTES} bytes.`,
      API_FAILURE_EXIT_CODE,
    );
  }
  const text = await response.text();
  if (text.length > MAX_RESPONSE_BYTES) {
    throw new CliError(
      `the server's answer is larger than ${MAX_RESPONSE_BYTES} bytes.`,
      API_FAILURE_EXIT_CODE,
    );
  }
  return text;
}

/**
 * A client for the server in `config`: sends `Authorization: Bearer <token>`, bounds each request in time
 * and size, and turns failures into CliErrors (401: the token was refused; other 4xx: the server's
 * message; unreachable server: its address and the cause).
 */
export function createApiClient(config: ApiConfig): ApiClient {
  return {
    config,
    async request(method, path, schema) {
      const url = `${config.baseUrl}${path}`;
      let response: Response;
      try {
        response = await fetch(url, {
          method,
          headers: { authorization: `Bearer ${config.token}`, accept: "application/json" },
          signal: AbortSignal.timeout(REQUEST_TIMEOUT_MS),
        });
      } catch (error) {
        throw new CliError(
          `cannot reach Sigmaflow at ${config.baseUrl} (${describeNetworkError(error)}). ` +
            "Check SIGMAFLOW_URL and that the server is running.",
          API_FAILURE_EXIT_CODE,
        );
      }
      const text = await readBounded(response);
      if (response.status === 401) {
        throw new CliError(TOKEN_REFUSED_MESSAGE, API_FAILURE_EXIT_CODE);
      }
      if (!response.ok) {
        throw new CliError(errorMessage(response.status, text), API_FAILURE_EXIT_CODE);
      }
      let body: unknown;
      try {
        body = JSON.parse(text);
      } catch {
        throw new CliError(
          `${method} ${path}: the server's answer is not JSON; is SIGMAFLOW_URL the address of a Sigmaflow server?`,
          API_FAILURE_EXIT_CODE,
        );
      }
      const parsed = schema.safeParse(body);
      if (!parsed.success) {
        const issue = parsed.error.issues[0];
        throw new CliError(
          `${method} ${path}: the server's answer has an unexpected shape (${issue?.path.join(".") || "body"}: ` +
            `${issue?.message}); this command line may be older or newer than the server.`,
          API_FAILURE_EXIT_CODE,
        );
      }
      return parsed.data;
    },
  };
}
