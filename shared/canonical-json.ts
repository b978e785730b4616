/**
 * JSON with every object's keys sorted (by UTF-16 code units, as `<` compares strings) and properties
 * whose value is `undefined` left out, at every depth; arrays keep their order. Two spellings of one
 * value give the same text, so hashes of it decide equality: run fingerprints (equal fingerprints may
 * reuse results) and the parameter-schema validator cache. Changing the output changes every stored
 * fingerprint, so it must stay byte for byte as it is.
 */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (value && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, item]) => item !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([key, item]) => `${JSON.stringify(key)}:${canonicalJson(item)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}
