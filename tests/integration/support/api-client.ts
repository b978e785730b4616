/**
 * The API as a script of a researcher sees it (bearer token, JSON in and out). Free of vitest, so
 * benchmarks use it too.
 */

// biome-ignore lint/suspicious/noExplicitAny: test responses are read loosely, field by field.
export type Api = <T = any>(
  method: string,
  path: string,
  body?: unknown,
) => Promise<{ status: number; body: T }>;

export function apiClient(baseUrl: string, token: string): Api {
  return async (method, urlPath, body) => {
    const response = await fetch(`${baseUrl}${urlPath}`, {
      method,
      headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    const text = await response.text();
    let parsed: unknown = text;
    try {
      parsed = text ? JSON.parse(text) : null;
    } catch {}
    return { status: response.status, body: parsed as never };
  };
}
