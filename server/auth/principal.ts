/**
 * Who is calling. A request is authenticated either by the session cookie (browser) or by an API token
 * (`Authorization: Bearer sf_...`, scripts). Services take a `Principal`, never a request.
 */
import type { Request } from "express";
import { unauthenticated } from "../http/errors";

export type Principal = {
  userId: string;
  email: string;
  displayName: string;
  isSiteAdmin: boolean;
  via: "session" | "token";
};

declare global {
  namespace Express {
    // passport's req.user is our Principal.
    interface User extends Principal {}
  }
}

export function principalOf(req: Request): Principal | undefined {
  return req.user ?? undefined;
}

export function requirePrincipal(req: Request): Principal {
  const principal = principalOf(req);
  if (!principal) throw unauthenticated();
  return principal;
}
