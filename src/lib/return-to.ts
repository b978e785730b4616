import { safeReturnTo } from "@shared/return-to";

export function signInHref(returnTo: string): string {
  return `/api/auth/login?returnTo=${encodeURIComponent(safeReturnTo(returnTo))}`;
}

export function signInPagePath(returnTo: string): string {
  const target = safeReturnTo(returnTo);
  return target === "/" ? "/signin" : `/signin?returnTo=${encodeURIComponent(target)}`;
}
