/**
 * How deeply a parsed JSON value nests objects and arrays. Many walks over JSON (JSON.stringify,
 * structuredClone, Ajv, key-sorting hashes) recurse once per level and overflow the stack somewhere
 * past a few thousand levels, which a 100 kB body easily reaches; checking the depth first, without
 * recursion, lets such input be refused with a clear message instead.
 */

/** Where a value nests too deeply: the keys (array indices as strings) leading to the first such place. */
export type DepthExcess = { path: string[] };

/**
 * The path to the first object or array of `value` that sits deeper than `maxDepth` levels, or null
 * when it stays within. `{}` and `[]` are one level, `{"a": []}` two; other values add none.
 * Iterative, one visit per value.
 */
export function findExcessDepth(value: unknown, maxDepth: number): DepthExcess | null {
  type Entry = { value: unknown; depth: number; key: string | null; parent: Entry | null };
  const stack: Entry[] = [{ value, depth: 1, key: null, parent: null }];
  while (stack.length > 0) {
    const entry = stack.pop()!;
    if (entry.value === null || typeof entry.value !== "object") continue;
    if (entry.depth > maxDepth) {
      const path: string[] = [];
      for (let at: Entry | null = entry; at && at.key !== null; at = at.parent) path.push(at.key);
      return { path: path.reverse() };
    }
    const children = Array.isArray(entry.value)
      ? entry.value.map((item, index) => [String(index), item] as const)
      : Object.entries(entry.value);
    for (const [key, child] of children) {
      if (child !== null && typeof child === "object") {
        stack.push({ value: child, depth: entry.depth + 1, key, parent: entry });
      }
    }
  }
  return null;
}
