/**
 * HTML helpers for the Halvorsen Institute sign-in pages. Every page is self-contained (inline CSS,
 * no scripts, no remote assets) so the development identity provider works offline.
 */
import { escapeHtml } from "../../shared/html";

/**
 * Inline styles only; no script, no remote loads. Forms may post to ourselves; no form-action limit,
 * because browsers apply it to the redirect chain back to the application as well.
 */
export const PAGE_CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; frame-ancestors 'none'";

const STYLES = `
*{box-sizing:border-box}
body{margin:0;min-height:100vh;font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;
  background:#eef1f4;color:#1d2733;display:flex;align-items:flex-start;justify-content:center;padding:48px 16px}
main{width:100%;max-width:440px}
.brand{display:flex;align-items:center;gap:12px;margin-bottom:20px}
.mark{width:40px;height:40px;border-radius:10px;background:#1f4e79;color:#fff;display:flex;align-items:center;
  justify-content:center;font-weight:700;font-size:18px;letter-spacing:.5px}
.brand-name{font-weight:650;font-size:17px}
.brand-sub{font-size:13px;color:#5b6775}
.card{background:#fff;border:1px solid #d7dde4;border-radius:12px;padding:28px;box-shadow:0 1px 2px rgba(16,24,40,.05)}
h1{font-size:20px;margin:0 0 4px}
.lead{margin:0 0 20px;color:#5b6775;font-size:14px}
label{display:block;font-size:14px;font-weight:600;margin:14px 0 6px}
input[type=email],input[type=password]{width:100%;padding:10px 12px;font-size:15px;border:1px solid #b9c3ce;
  border-radius:8px;background:#fff;color:inherit}
input:focus{outline:2px solid #2f6fb0;outline-offset:1px;border-color:#2f6fb0}
button{margin-top:20px;width:100%;padding:11px 14px;font-size:15px;font-weight:600;border:0;border-radius:8px;
  background:#1f4e79;color:#fff;cursor:pointer}
button:hover{background:#173d60}
button.secondary{background:#fff;color:#1f4e79;border:1px solid #b9c3ce;margin-top:10px}
button.secondary:hover{background:#f3f6f9}
.alert{margin:0 0 16px;padding:10px 12px;border-radius:8px;background:#fdecec;border:1px solid #f1b5b5;
  color:#8a1c1c;font-size:14px}
.demo{margin-top:20px;font-size:13px;color:#3b4652}
.demo h2{font-size:14px;margin:0 0 8px}
.demo table{width:100%;border-collapse:collapse}
.demo th,.demo td{text-align:left;padding:6px 4px;border-top:1px solid #e3e8ed;vertical-align:top}
.demo th{font-weight:600;color:#5b6775}
code{font-family:ui-monospace,"SFMono-Regular",Menlo,Consolas,monospace;font-size:12.5px;background:#f3f6f9;
  padding:1px 4px;border-radius:4px}
.foot{margin-top:16px;font-size:12px;color:#6b7683;text-align:center}
`;

/** Wraps page content in the shared Halvorsen Institute frame. `bodyHtml` must already be escaped. */
export function renderPage(titleText: string, bodyHtml: string): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(titleText)} · Halvorsen Institute</title>
<style>${STYLES}</style>
</head>
<body>
<main>
<div class="brand"><div class="mark" aria-hidden="true">HI</div>
<div><div class="brand-name">Halvorsen Institute</div><div class="brand-sub">Identity service</div></div></div>
${bodyHtml}
<p class="foot">Development identity service – not for real credentials.</p>
</main>
</body>
</html>`;
}

/** A card with a heading and one paragraph, for errors and notices. */
export function renderNoticePage(titleText: string, messageText: string): string {
  return renderPage(
    titleText,
    `<div class="card"><h1>${escapeHtml(titleText)}</h1><p class="lead">${escapeHtml(messageText)}</p></div>`,
  );
}
