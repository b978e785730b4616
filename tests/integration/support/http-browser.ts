import { createServer } from "node:net";

/** A port the OS just handed out; the issuer URL needs the number before the server starts. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const address = server.address();
      const port = typeof address === "object" && address ? address.port : 0;
      server.close(() => resolve(port));
    });
  });
}

type Cookie = { name: string; value: string; path: string };

/** Just enough of RFC 6265 for oidc-provider's cookies: name, value, path, deletion by expiry. */
export class CookieJar {
  private readonly cookies = new Map<string, Cookie>();

  store(response: Response): void {
    for (const line of response.headers.getSetCookie()) {
      const [pair = "", ...attributes] = line.split(";");
      const eq = pair.indexOf("=");
      const cookie: Cookie = { name: pair.slice(0, eq).trim(), value: pair.slice(eq + 1).trim(), path: "/" };
      let expired = false;
      for (const attribute of attributes) {
        const [key = "", value = ""] = attribute.split("=");
        const name = key.trim().toLowerCase();
        if (name === "path") cookie.path = value.trim();
        if (name === "expires" && Date.parse(value) <= Date.now()) expired = true;
        if (name === "max-age" && Number(value) <= 0) expired = true;
      }
      const key = `${cookie.name}|${cookie.path}`;
      if (expired) this.cookies.delete(key);
      else this.cookies.set(key, cookie);
    }
  }

  headerFor(url: URL): string {
    return [...this.cookies.values()]
      .filter((c) => c.path === "/" || url.pathname === c.path || url.pathname.startsWith(`${c.path}/`))
      .map((c) => `${c.name}=${c.value}`)
      .join("; ");
  }
}

/** One browser: sends the jar's cookies, keeps new ones, never follows redirects by itself. */
export async function browse(jar: CookieJar, url: URL, init: RequestInit = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  const cookie = jar.headerFor(url);
  if (cookie) headers.set("cookie", cookie);
  const response = await fetch(url, { ...init, headers, redirect: "manual" });
  jar.store(response);
  return response;
}
