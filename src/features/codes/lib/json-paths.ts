/**
 * Where a path such as `inputTemplates.0.template` sits in the JSON text of a definition: the line of the
 * key (or array element) it names, so an error the server reports at a path can point into the editor.
 * A small scanner over JSON text; it returns null for text that is not JSON or a path it does not hold.
 */
export function lineOfPath(text: string, path: string): number | null {
  if (path === "") return 1;
  const wanted = path;
  // Stack of containers: for objects the current key, for arrays the current index.
  const stack: { kind: "object" | "array"; key: string | null; index: number; expectKey: boolean }[] = [];
  let line = 1;
  const currentPath = () =>
    stack.map((frame) => (frame.kind === "array" ? String(frame.index) : (frame.key ?? ""))).join(".");
  let i = 0;
  let valueStarting = true;
  const startValue = () => {
    const top = stack[stack.length - 1];
    if (top && top.kind === "array" && valueStarting) {
      if (currentPath() === wanted) return true;
    }
    return false;
  };
  while (i < text.length) {
    const ch = text[i]!;
    if (ch === "\n") {
      line++;
      i++;
      continue;
    }
    if (ch === " " || ch === "\t" || ch === "\r") {
      i++;
      continue;
    }
    const top = stack[stack.length - 1];
    if (ch === "{" || ch === "[") {
      if (startValue()) return line;
      valueStarting = false;
      stack.push({ kind: ch === "{" ? "object" : "array", key: null, index: 0, expectKey: ch === "{" });
      valueStarting = true;
      i++;
      continue;
    }
    if (ch === "}" || ch === "]") {
      stack.pop();
      valueStarting = false;
      i++;
      continue;
    }
    if (ch === ",") {
      if (top?.kind === "array") top.index++;
      if (top?.kind === "object") top.expectKey = true;
      valueStarting = true;
      i++;
      continue;
    }
    if (ch === ":") {
      if (top) top.expectKey = false;
      valueStarting = true;
      i++;
      continue;
    }
    if (ch === '"') {
      let j = i + 1;
      let raw = "";
      while (j < text.length && text[j] !== '"') {
        if (text[j] === "\\") {
          raw += text.slice(j, j + 2);
          j += 2;
        } else {
          if (text[j] === "\n") return null;
          raw += text[j];
          j++;
        }
      }
      if (j >= text.length) return null;
      if (top?.kind === "object" && top.expectKey) {
        try {
          top.key = JSON.parse(`"${raw}"`) as string;
        } catch {
          return null;
        }
        if (currentPath() === wanted) return line;
      } else if (startValue()) {
        return line;
      }
      valueStarting = false;
      i = j + 1;
      continue;
    }
    // A number, true, false or null.
    if (startValue()) return line;
    valueStarting = false;
    while (i < text.length && !/[\s,\]}]/.test(text[i]!)) i++;
  }
  return null;
}

/** The character offsets of a 1-based line, for selecting it in a textarea. */
export function lineRange(text: string, line: number): { start: number; end: number } {
  let start = 0;
  for (let n = 1; n < line; n++) {
    const next = text.indexOf("\n", start);
    if (next === -1) break;
    start = next + 1;
  }
  const end = text.indexOf("\n", start);
  return { start, end: end === -1 ? text.length : end };
}
