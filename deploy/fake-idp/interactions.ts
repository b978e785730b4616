/**
 * Our own interaction routes (GET/POST /interaction/:uid), served in front of oidc-provider: the
 * login prompt shows the Halvorsen Institute sign-in form, the consent prompt is granted without a
 * page because Sigmaflow is the only, first-party client of this development service.
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type Provider from "oidc-provider";
import { z } from "zod";
import { checkDemoCredentials } from "./demo-directory";
import { PAGE_CSP, renderNoticePage } from "./html";
import { renderLoginPage } from "./login-page";

type Interaction = Awaited<ReturnType<Provider["interactionDetails"]>>;

/** A sign-in form is two short fields; anything larger is not ours. */
const MAX_FORM_BYTES = 16 * 1024;

const loginFormSchema = z.object({
  email: z.string().max(320).default(""),
  password: z.string().max(1024).default(""),
});

const consentDetailsSchema = z.object({
  missingOIDCScope: z.array(z.string()).optional(),
  missingOIDCClaims: z.array(z.string()).optional(),
  missingResourceScopes: z.record(z.string(), z.array(z.string())).optional(),
});

const WRONG_CREDENTIALS = "The e-mail or password is not correct. Check the demo accounts below.";
const EXPIRED_TEXT =
  "This sign-in request has expired or was already used. Go back to the application and sign in again.";

class FormTooLargeError extends Error {}

function sendHtml(res: ServerResponse, status: number, html: string): void {
  res.statusCode = status;
  res.setHeader("Content-Type", "text/html; charset=utf-8");
  res.setHeader("Cache-Control", "no-store");
  res.setHeader("Content-Security-Policy", PAGE_CSP);
  res.end(html);
}

async function readForm(req: IncomingMessage): Promise<URLSearchParams> {
  const chunks: Buffer[] = [];
  let total = 0;
  for await (const chunk of req) {
    const buffer = chunk as Buffer;
    total += buffer.length;
    if (total > MAX_FORM_BYTES) throw new FormTooLargeError("form too large");
    chunks.push(buffer);
  }
  return new URLSearchParams(Buffer.concat(chunks).toString("utf8"));
}

async function grantConsent(
  provider: Provider,
  req: IncomingMessage,
  res: ServerResponse,
  interaction: Interaction,
): Promise<void> {
  const accountId = interaction.session?.accountId;
  const clientId = interaction.params.client_id;
  if (!accountId || typeof clientId !== "string") {
    sendHtml(res, 400, renderNoticePage("Sign-in expired", EXPIRED_TEXT));
    return;
  }
  const existing = interaction.grantId ? await provider.Grant.find(interaction.grantId) : undefined;
  const grant = existing ?? new provider.Grant({ accountId, clientId });
  const details = consentDetailsSchema.parse(interaction.prompt.details);
  if (details.missingOIDCScope) grant.addOIDCScope(details.missingOIDCScope.join(" "));
  if (details.missingOIDCClaims) grant.addOIDCClaims(details.missingOIDCClaims);
  for (const [indicator, scopes] of Object.entries(details.missingResourceScopes ?? {})) {
    grant.addResourceScope(indicator, scopes.join(" "));
  }
  const grantId = await grant.save();
  await provider.interactionFinished(req, res, { consent: { grantId } }, { mergeWithLastSubmission: true });
}

async function handleLogin(
  provider: Provider,
  req: IncomingMessage,
  res: ServerResponse,
  interaction: Interaction,
): Promise<void> {
  const clientId = interaction.params.client_id;
  const client = typeof clientId === "string" ? await provider.Client.find(clientId) : undefined;
  const clientName = client?.clientName ?? client?.clientId ?? "the application";

  if (req.method === "GET") {
    sendHtml(res, 200, renderLoginPage({ uid: interaction.uid, clientName }));
    return;
  }
  const form = loginFormSchema.parse(Object.fromEntries(await readForm(req)));
  const account = checkDemoCredentials(form.email, form.password);
  if (!account) {
    // Same page again, nothing else changes: the interaction stays open for the next try.
    const page = renderLoginPage({
      uid: interaction.uid,
      clientName,
      email: form.email,
      errorText: WRONG_CREDENTIALS,
    });
    sendHtml(res, 200, page);
    return;
  }
  await provider.interactionFinished(
    req,
    res,
    { login: { accountId: account.subject } },
    { mergeWithLastSubmission: false },
  );
}

/** Handles one request to /interaction/:uid; answers every outcome itself. */
export async function handleInteraction(
  provider: Provider,
  req: IncomingMessage,
  res: ServerResponse,
  uid: string,
): Promise<void> {
  if (req.method !== "GET" && req.method !== "POST") {
    res.setHeader("Allow", "GET, POST");
    sendHtml(res, 405, renderNoticePage("Not allowed", "This page only accepts GET and POST."));
    return;
  }
  let interaction: Interaction;
  try {
    interaction = await provider.interactionDetails(req, res);
  } catch {
    // Missing or expired interaction cookie: oidc-provider throws SessionNotFound.
    sendHtml(res, 400, renderNoticePage("Sign-in expired", EXPIRED_TEXT));
    return;
  }
  // The cookie names the interaction; the URL must name the same one.
  if (interaction.uid !== uid) {
    sendHtml(res, 400, renderNoticePage("Sign-in expired", EXPIRED_TEXT));
    return;
  }
  try {
    switch (interaction.prompt.name) {
      case "login":
        await handleLogin(provider, req, res, interaction);
        return;
      case "consent":
        await grantConsent(provider, req, res, interaction);
        return;
      default:
        sendHtml(res, 400, renderNoticePage("Unsupported request", "This sign-in step is not supported."));
    }
  } catch (error) {
    if (error instanceof FormTooLargeError) {
      sendHtml(res, 413, renderNoticePage("Request too large", "The submitted form is too large."));
      return;
    }
    throw error;
  }
}
