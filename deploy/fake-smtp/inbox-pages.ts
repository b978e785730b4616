/** The development inbox's two pages: the message list and one message. */
import { escapeHtml } from "../../shared/html";
import { formatReceivedAt, linkifyText, renderPage } from "./html";
import type { StoredMessage } from "./message-store";

function messageHref(message: StoredMessage): string {
  return `/messages/${encodeURIComponent(message.id)}`;
}

export function renderInboxPage(messages: StoredMessage[]): string {
  const clearForm =
    messages.length > 0
      ? `<form method="post" action="/messages/clear"><button type="submit">Clear all</button></form>`
      : "";
  if (messages.length === 0) {
    return renderPage("Sigmaflow development inbox", clearForm, `<p class="empty">No messages yet.</p>`);
  }
  const rows = messages
    .map(
      (message) => `<tr>
<td class="time">${escapeHtml(formatReceivedAt(message.receivedAt))}</td>
<td>${escapeHtml(message.from)}</td>
<td>${escapeHtml(message.to.join(", "))}</td>
<td><a href="${escapeHtml(messageHref(message))}">${escapeHtml(message.subject || "(no subject)")}</a></td>
</tr>`,
    )
    .join("\n");
  const body = `<p class="hint">Mail sent to the development SMTP port lands here. Newest first; reload to refresh.</p>
<table>
<thead><tr><th scope="col">Received</th><th scope="col">From</th><th scope="col">To</th><th scope="col">Subject</th></tr></thead>
<tbody>
${rows}
</tbody>
</table>`;
  return renderPage("Sigmaflow development inbox", clearForm, body);
}

/**
 * The HTML body goes into a sandboxed iframe: no scripts, no same-origin access, and links open in a
 * new tab (the <base> element plus allow-popups) so invitation links stay clickable.
 */
function renderHtmlBody(html: string): string {
  const srcdoc = `<base target="_blank">${html}`;
  return `<section class="card"><h2>HTML body</h2>
<iframe title="HTML body of the message" sandbox="allow-popups allow-popups-to-escape-sandbox" referrerpolicy="no-referrer" srcdoc="${escapeHtml(srcdoc)}"></iframe>
</section>`;
}

export function renderMessagePage(message: StoredMessage): string {
  const headerRows = [
    ["Received", formatReceivedAt(message.receivedAt)],
    ["Envelope recipients", message.to.join(", ")],
    ...message.headers,
  ]
    .map(([name = "", value = ""]) => `<dt>${escapeHtml(name)}</dt><dd>${escapeHtml(value)}</dd>`)
    .join("\n");
  const text = message.text
    ? `<section class="card"><h2>Text body</h2><pre>${linkifyText(message.text)}</pre></section>`
    : "";
  const body = `<a class="back" href="/">← All messages</a>
<section class="card"><h2>${escapeHtml(message.subject || "(no subject)")}</h2><dl>
${headerRows}
</dl></section>
${text}
${message.html === null ? "" : renderHtmlBody(message.html)}`;
  return renderPage(message.subject || "(no subject)", "", body);
}

export function renderNotFoundPage(): string {
  return renderPage(
    "Not found",
    "",
    `<a class="back" href="/">← All messages</a><p class="empty">This message does not exist (any more).</p>`,
  );
}
