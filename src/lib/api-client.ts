import { apiErrorSchema } from "@shared/schemas";
import type { z } from "zod";
import { ApiRequestError } from "./api-error";

type CsrfTokenSource = () => string | undefined;

// The session's CSRF token lives in the cached `GET /api/me` answer; the app layer tells the client
// how to read it so this module stays unaware of any feature's query keys.
let readCsrfToken: CsrfTokenSource = () => undefined;

export function setCsrfTokenSource(source: CsrfTokenSource): void {
  readCsrfToken = source;
}

type Method = "GET" | "POST" | "PATCH" | "PUT" | "DELETE";

type RequestOptions = {
  method?: Method;
  body?: unknown;
  signal?: AbortSignal;
};

/**
 * Same-origin API URL. Built absolute because fetch outside a browser page (jsdom tests) has no base URL.
 */
export function apiUrl(path: string): string {
  return new URL(path, window.location.origin).toString();
}

async function send(path: string, options: RequestOptions): Promise<Response> {
  const method = options.method ?? "GET";
  const headers = new Headers({ accept: "application/json" });
  // FormData (a file upload) is sent as multipart/form-data with the boundary fetch chooses.
  const multipart = options.body instanceof FormData;
  if (options.body !== undefined && !multipart) headers.set("content-type", "application/json");
  if (method !== "GET") {
    const csrfToken = readCsrfToken();
    if (csrfToken) headers.set("x-csrf-token", csrfToken);
  }

  let response: Response;
  try {
    response = await fetch(apiUrl(path), {
      method,
      headers,
      credentials: "same-origin",
      body:
        options.body === undefined
          ? undefined
          : multipart
            ? (options.body as FormData)
            : JSON.stringify(options.body),
      signal: options.signal,
    });
  } catch (cause) {
    if (cause instanceof DOMException && cause.name === "AbortError") throw cause;
    throw new ApiRequestError({
      status: 0,
      code: "network_error",
      message: "Sigmaflow's server could not be reached. Check your connection and try again.",
    });
  }

  if (!response.ok) throw await toApiRequestError(response);
  return response;
}

async function toApiRequestError(response: Response): Promise<ApiRequestError> {
  const body: unknown = await response.json().catch(() => undefined);
  const parsed = apiErrorSchema.safeParse(body);
  if (parsed.success) {
    return new ApiRequestError({ status: response.status, ...parsed.data.error });
  }
  return new ApiRequestError({
    status: response.status,
    code: `http_${response.status}`,
    message: `The server answered with status ${response.status}.`,
  });
}

async function parseBody<S extends z.ZodType>(response: Response, schema: S): Promise<z.output<S>> {
  const body: unknown = await response.json().catch(() => undefined);
  const parsed = schema.safeParse(body);
  if (!parsed.success) {
    throw new ApiRequestError({
      status: response.status,
      code: "invalid_response",
      message:
        "The server's answer did not have the expected shape. Reload the page; if it persists, tell your site admin.",
      details: parsed.error.issues,
    });
  }
  return parsed.data;
}

/** JSON calls whose answer is parsed with a zod schema, and body-less ones (204) that resolve to void. */
export const api = {
  get<S extends z.ZodType>(path: string, schema: S, init: { signal?: AbortSignal } = {}) {
    return send(path, { signal: init.signal }).then((response) => parseBody(response, schema));
  },
  post<S extends z.ZodType>(path: string, body: unknown, schema: S) {
    return send(path, { method: "POST", body }).then((response) => parseBody(response, schema));
  },
  /** A multipart/form-data POST, e.g. an uploaded file beside text fields. */
  postForm<S extends z.ZodType>(path: string, form: FormData, schema: S) {
    return send(path, { method: "POST", body: form }).then((response) => parseBody(response, schema));
  },
  patch<S extends z.ZodType>(path: string, body: unknown, schema: S) {
    return send(path, { method: "PATCH", body }).then((response) => parseBody(response, schema));
  },
  /** For endpoints that answer 204 No Content. */
  async command(method: Exclude<Method, "GET">, path: string, body?: unknown): Promise<void> {
    await send(path, { method, body });
  },
};
