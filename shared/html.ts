/**
 * Escapes text for HTML element content and for quoted attribute values alike: the five characters
 * that can end either (& < > " ') become entities. Everything Sigmaflow writes into HTML from data —
 * e-mails, its own error pages, the development identity provider and mail inbox — goes through this.
 */
const HTML_ENTITIES: Record<string, string> = {
  "&": "&amp;",
  "<": "&lt;",
  ">": "&gt;",
  '"': "&quot;",
  "'": "&#39;",
};

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (character) => HTML_ENTITIES[character] ?? character);
}
