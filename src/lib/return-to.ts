/**
 * Only same-site paths are accepted as a place to return to after signing in, so a crafted link
 * cannot bounce someone to another site ("//evil.example" and "/\evil.example" are protocol-relative).
 */
export function safeReturnTo(value: string | null | undefined, fallback = "/"): string {
  if (!value?.startsWith("/") || value.startsWith("//") || value.startsWith("/\\")) return fallback;
  if (value.startsWith("/signin")) return fallback;
  return value;
}

export function signInHref(returnTo: string): string {
  return `/api/auth/login?returnTo=${encodeURIComponent(safeReturnTo(returnTo))}`;
}

export function signInPagePath(returnTo: string): string {
  const target = safeReturnTo(returnTo);
  return target === "/" ? "/signin" : `/signin?returnTo=${encodeURIComponent(target)}`;
}
