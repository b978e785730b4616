/**
 * The development inbox over HTTP: two HTML pages for people and a small JSON API for tests and
 * scripts (list with optional recipient filter, one message, clear all).
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import { z } from "zod";
import { renderInboxPage, renderMessagePage, renderNotFoundPage } from "./inbox-pages";
import type { MessageStore, StoredMessage } from "./message-store";

/** The list page has no script and no remote loads; its one form posts to us. */
const LIST_CSP = "default-src 'none'; style-src 'unsafe-inline'; form-action 'self'; base-uri 'none'";
/**
 * The message page's policy is inherited by the srcdoc iframe, so it is written for mail content:
 * no scripts, no plugins, no remote images, no form submissions; inline styles stay allowed.
 */
const MESSAGE_CSP = "script-src 'none'; object-src 'none'; img-src data:; form-action 'none'";

const listQuerySchema = z.object({ to: z.string().trim().min(1).max(320).optional() });

const MESSAGE_PATH = /^\/messages\/([^/]+)$/;
const API_MESSAGE_PATH = /^\/api\/messages\/([^/]+)$/;

function toApiMessage(message: StoredMessage) {
  const { id, receivedAt, from, to, subject, text, html } = message;
  return { id, receivedAt, from, to, subject, text, html };
}

function sendHtml(res: ServerResponse, status: number, html: string, csp: string): void {
  res.statusCode = status;
  res.setHeader("Content-Type", "text/html; charset=utf-8");
  res.setHeader("Cache-Control", "no-store");
  res.setHeader("Content-Security-Policy", csp);
  res.setHeader("X-Content-Type-Options", "nosniff");
  res.end(html);
}

function sendJson(res: ServerResponse, status: number, body: unknown): void {
  res.statusCode = status;
  res.setHeader("Content-Type", "application/json; charset=utf-8");
  res.setHeader("Cache-Control", "no-store");
  res.end(JSON.stringify(body));
}

function decodeId(raw: string): string | undefined {
  try {
    return decodeURIComponent(raw);
  } catch {
    return undefined;
  }
}

async function handleApi(
  store: MessageStore,
  req: IncomingMessage,
  res: ServerResponse,
  url: URL,
): Promise<void> {
  if (url.pathname === "/api/messages") {
    if (req.method === "GET") {
      const query = listQuerySchema.safeParse(Object.fromEntries(url.searchParams));
      if (!query.success) {
        sendJson(res, 400, { error: "invalid query", issues: query.error.issues });
        return;
      }
      const filter = query.data.to ? { to: query.data.to } : {};
      sendJson(res, 200, { messages: store.list(filter).map(toApiMessage) });
      return;
    }
    if (req.method === "DELETE") {
      sendJson(res, 200, { deleted: await store.clear() });
      return;
    }
    res.setHeader("Allow", "GET, DELETE");
    sendJson(res, 405, { error: "method not allowed" });
    return;
  }
  const match = API_MESSAGE_PATH.exec(url.pathname);
  if (!match?.[1]) {
    sendJson(res, 404, { error: "not found" });
    return;
  }
  if (req.method !== "GET") {
    res.setHeader("Allow", "GET");
    sendJson(res, 405, { error: "method not allowed" });
    return;
  }
  const id = decodeId(match[1]);
  const message = id === undefined ? undefined : store.get(id);
  if (!message) {
    sendJson(res, 404, { error: "not found" });
    return;
  }
  sendJson(res, 200, toApiMessage(message));
}

export function createInboxHandler(store: MessageStore) {
  return async (req: IncomingMessage, res: ServerResponse): Promise<void> => {
    const url = new URL(req.url ?? "/", "http://inbox.invalid");
    if (url.pathname.startsWith("/api/")) {
      await handleApi(store, req, res, url);
      return;
    }
    if (req.method === "GET" && url.pathname === "/") {
      sendHtml(res, 200, renderInboxPage(store.list()), LIST_CSP);
      return;
    }
    if (req.method === "POST" && url.pathname === "/messages/clear") {
      await store.clear();
      res.statusCode = 303;
      res.setHeader("Location", "/");
      res.end();
      return;
    }
    const match = MESSAGE_PATH.exec(url.pathname);
    const id = match?.[1] === undefined ? undefined : decodeId(match[1]);
    const message = req.method === "GET" && id !== undefined ? store.get(id) : undefined;
    if (message) {
      sendHtml(res, 200, renderMessagePage(message), MESSAGE_CSP);
      return;
    }
    sendHtml(res, 404, renderNotFoundPage(), LIST_CSP);
  };
}
