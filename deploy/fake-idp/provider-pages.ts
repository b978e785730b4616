/**
 * Replacements for oidc-provider's built-in sign-out and error pages, which load remote fonts and
 * carry the library's own look. Same frame as the sign-in page.
 */
import type { Configuration, KoaContextWithOIDC } from "oidc-provider";
import { escapeHtml } from "../../shared/html";
import { PAGE_CSP, renderNoticePage, renderPage } from "./html";

function sendHtml(ctx: KoaContextWithOIDC, html: string): void {
  ctx.type = "html";
  ctx.set("Content-Security-Policy", PAGE_CSP);
  ctx.body = html;
}

function clientDisplayName(ctx: KoaContextWithOIDC): string {
  const client = ctx.oidc?.client;
  return client?.clientName ?? client?.clientId ?? "the application";
}

/**
 * `form` is the provider's hidden form (with its anti-forgery token); the buttons submit it. A "yes"
 * value in `logout` ends the session at the identity service too.
 */
async function logoutSource(ctx: KoaContextWithOIDC, form: string): Promise<void> {
  const body = `<div class="card">
<h1>Sign out</h1>
<p class="lead">You are leaving ${escapeHtml(clientDisplayName(ctx))}. Also sign out of the Halvorsen Institute identity service?</p>
${form}
<button type="submit" form="op.logoutForm" name="logout" value="yes" autofocus>Yes, sign me out</button>
<button type="submit" form="op.logoutForm" class="secondary">No, stay signed in here</button>
</div>`;
  sendHtml(ctx, renderPage("Sign out", body));
}

async function postLogoutSuccessSource(ctx: KoaContextWithOIDC): Promise<void> {
  sendHtml(ctx, renderNoticePage("Signed out", "You have been signed out. You can close this tab."));
}

type ErrorOut = { error?: string; error_description?: string };

async function renderError(ctx: KoaContextWithOIDC, out: ErrorOut): Promise<void> {
  const code = out.error ?? "server_error";
  const description = out.error_description ?? "The sign-in request could not be completed.";
  const body = `<div class="card">
<h1>Something went wrong</h1>
<p class="lead" role="alert">${escapeHtml(description)}</p>
<p class="lead">Error code: <code>${escapeHtml(code)}</code></p>
</div>`;
  sendHtml(ctx, renderPage("Sign-in error", body));
}

export const providerPages = {
  renderError,
  logoutSource,
  postLogoutSuccessSource,
} satisfies {
  renderError: NonNullable<Configuration["renderError"]>;
  logoutSource: (ctx: KoaContextWithOIDC, form: string) => Promise<void>;
  postLogoutSuccessSource: (ctx: KoaContextWithOIDC) => Promise<void>;
};
