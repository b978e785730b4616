/** The one HTML escaper (shared/html.ts); expected strings written by hand from the five entities. */
import { describe, expect, it } from "vitest";
import { escapeHtml } from "../../../shared/html";

describe("escapeHtml", () => {
  it("escapes the five characters that can end element content or a quoted attribute", () => {
    expect(escapeHtml(`<a href="x" title='y'>&</a>`)).toBe(
      "&lt;a href=&quot;x&quot; title=&#39;y&#39;&gt;&amp;&lt;/a&gt;",
    );
  });

  it("escapes an ampersand once, so escaped text is not read as an entity", () => {
    expect(escapeHtml("&amp;")).toBe("&amp;amp;");
  });

  it("leaves other text as it is", () => {
    expect(escapeHtml("Run “N₂ R-matrix” — 100% done\n")).toBe("Run “N₂ R-matrix” — 100% done\n");
  });
});
