/**
 * The API as a script of a researcher sees it (bearer token, JSON in and out), and a patient wait for a
 * condition. Free of vitest, so benchmarks use it too.
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

/** Polls `read` until `accept` holds or the time is up (then fails with the last value seen). */
export async function waitFor<T>(
  read: () => Promise<T>,
  accept: (value: T) => boolean,
  timeoutMs = 30_000,
  label = "condition",
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: T = await read();
  while (!accept(last)) {
    if (Date.now() > deadline)
      throw new Error(`timed out waiting for ${label}; last seen: ${JSON.stringify(last).slice(0, 800)}`);
    await new Promise((resolve) => setTimeout(resolve, 100));
    last = await read();
  }
  return last;
}
