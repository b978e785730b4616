/** HTML helpers for the development inbox: link detection and the shared page frame. */
import { escapeHtml } from "../../shared/html";

const URL_PATTERN = /https?:\/\/[^\s<>"']+/g;
/** Sentence punctuation right after a URL belongs to the sentence, not the URL. */
const TRAILING_PUNCTUATION = /[.,;:!?)\]}]+$/;

/** Escapes plain text and turns http(s) URLs into links that open in a new tab. */
export function linkifyText(text: string): string {
  let html = "";
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index;
    const url = match[0].replace(TRAILING_PUNCTUATION, "");
    html += escapeHtml(text.slice(last, start));
    const href = escapeHtml(url);
    html += `<a href="${href}" target="_blank" rel="noopener noreferrer">${href}</a>`;
    last = start + url.length;
  }
  return html + escapeHtml(text.slice(last));
}

/** "2026-03-04 09:15:02 UTC": unambiguous for everybody reading the same inbox. */
export function formatReceivedAt(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 19)} UTC`;
}

const STYLES = `
*{box-sizing:border-box}
body{margin:0;font-family:system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;background:#f5f6f8;color:#1f2933}
header{background:#fff;border-bottom:1px solid #dde2e8;padding:14px 24px;display:flex;align-items:center;
  justify-content:space-between;gap:16px}
header h1{font-size:17px;margin:0;font-weight:650}
header a{color:inherit;text-decoration:none}
main{max-width:1100px;margin:0 auto;padding:24px}
.hint{color:#5f6b78;font-size:13px;margin:0 0 16px}
table{width:100%;border-collapse:collapse;background:#fff;border:1px solid #dde2e8;border-radius:10px;overflow:hidden}
th,td{text-align:left;padding:10px 12px;border-bottom:1px solid #edf0f3;font-size:14px;vertical-align:top}
th{background:#fafbfc;color:#5f6b78;font-weight:600;font-size:13px}
tr:last-child td{border-bottom:0}
td.time{white-space:nowrap;color:#5f6b78;font-variant-numeric:tabular-nums}
a{color:#1d5fa8}
.empty{background:#fff;border:1px dashed #c9d1da;border-radius:10px;padding:40px;text-align:center;color:#5f6b78}
button{font:inherit;font-size:13px;padding:6px 12px;border-radius:6px;border:1px solid #c9d1da;background:#fff;
  color:#1f2933;cursor:pointer}
button:hover{background:#f0f3f6}
.card{background:#fff;border:1px solid #dde2e8;border-radius:10px;padding:18px 20px;margin-bottom:18px}
.card h2{font-size:15px;margin:0 0 12px}
dl{display:grid;grid-template-columns:max-content 1fr;gap:6px 16px;margin:0;font-size:14px}
dt{color:#5f6b78}
dd{margin:0;word-break:break-word}
pre{white-space:pre-wrap;word-break:break-word;margin:0;font-family:ui-monospace,"SFMono-Regular",Menlo,Consolas,
  monospace;font-size:13px;line-height:1.5}
iframe{width:100%;height:480px;border:1px solid #dde2e8;border-radius:6px;background:#fff}
.back{display:inline-block;margin-bottom:14px;font-size:14px}
`;

/** Wraps page content; `bodyHtml` must already be escaped. */
export function renderPage(titleText: string, headerExtraHtml: string, bodyHtml: string): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(titleText)}</title>
<style>${STYLES}</style>
</head>
<body>
<header><h1><a href="/">Sigmaflow development inbox</a></h1>${headerExtraHtml}</header>
<main>
${bodyHtml}
</main>
</body>
</html>`;
}
