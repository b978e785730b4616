/**
 * What a browser downloads before the first page can draw, against the budget of 300 kB of JavaScript
 * after gzip, and where the heavy libraries went (each must sit in a chunk loaded on demand).
 *
 *   node --import tsx bench/client/bundle.bench.ts
 *
 * Builds the client with the project's vite.config.ts into a temporary folder with a build manifest.
 * Initial JavaScript = the entry chunk and every chunk it imports statically (transitively): what
 * index.html loads and modulepreloads. Route pages, the terminal, charts, the 3D viewer and the forms
 * library are dynamic imports and are listed apart. Sizes are gzip level 9 of the built files, as a
 * server or CDN would send them compressed.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { build } from "vite";

const BUDGET_GZIP_BYTES = 300 * 1000;
/** Libraries that must stay out of the initial download, by the path of one of their modules. */
const LAZY_LIBRARIES: Record<string, RegExp> = {
  "xterm (terminal)": /node_modules\/@xterm\/xterm\//,
  "uPlot (charts)": /node_modules\/uplot\//,
  "3Dmol.js (3D viewer)": /node_modules\/3dmol\//,
  "react-hook-form (forms)": /node_modules\/react-hook-form\//,
  "ajv (schema validation)": /node_modules\/ajv\//,
  "socket.io-client (live feed)": /node_modules\/socket\.io-client\//,
  "TanStack Table": /node_modules\/@tanstack\/table-core\//,
};

type ManifestChunk = {
  file: string;
  isEntry?: boolean;
  isDynamicEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
  css?: string[];
};

const outDir = mkdtempSync(path.join(tmpdir(), "sigmaflow-bundle-"));
try {
  await build({
    logLevel: "warn",
    build: { outDir, emptyOutDir: true, manifest: true, sourcemap: true },
  });
  const manifest = JSON.parse(readFileSync(path.join(outDir, ".vite/manifest.json"), "utf8")) as Record<
    string,
    ManifestChunk
  >;
  const gzipOf = (file: string) => gzipSync(readFileSync(path.join(outDir, file)), { level: 9 }).length;
  const rawOf = (file: string) => readFileSync(path.join(outDir, file)).length;

  const entryKey = Object.keys(manifest).find((key) => manifest[key]!.isEntry);
  if (!entryKey) throw new Error("the build has no entry chunk");
  const initial = new Set<string>();
  const visit = (key: string) => {
    if (initial.has(key)) return;
    initial.add(key);
    for (const imported of manifest[key]!.imports ?? []) visit(imported);
  };
  visit(entryKey);

  const files = new Map<string, { raw: number; gzip: number; initial: boolean }>();
  for (const [key, chunk] of Object.entries(manifest)) {
    if (!chunk.file.endsWith(".js")) continue;
    const previous = files.get(chunk.file);
    files.set(chunk.file, {
      raw: rawOf(chunk.file),
      gzip: gzipOf(chunk.file),
      initial: (previous?.initial ?? false) || initial.has(key),
    });
  }
  const initialFiles = [...files.entries()].filter(([, size]) => size.initial);
  const initialGzip = initialFiles.reduce((sum, [, size]) => sum + size.gzip, 0);
  const initialRaw = initialFiles.reduce((sum, [, size]) => sum + size.raw, 0);
  const initialCss = [...initial]
    .flatMap((key) => manifest[key]!.css ?? [])
    .reduce((sum, file) => sum + gzipOf(file), 0);

  const kB = (bytes: number) => `${(bytes / 1000).toFixed(1)} kB`;
  console.log("Initial JavaScript (entry + static imports):");
  for (const [file, size] of initialFiles.sort((a, b) => b[1].gzip - a[1].gzip))
    console.log(`  ${file.padEnd(48)} ${kB(size.raw).padStart(10)} raw ${kB(size.gzip).padStart(10)} gzip`);
  console.log(
    `  total: ${kB(initialRaw)} raw, ${kB(initialGzip)} gzip — budget ${kB(BUDGET_GZIP_BYTES)} gzip: ${
      initialGzip <= BUDGET_GZIP_BYTES ? "within" : "OVER"
    }`,
  );
  console.log(`  initial CSS: ${kB(initialCss)} gzip`);

  // Where each heavy library ended up, from the source maps' module lists.
  console.log("\nHeavy libraries (must be in chunks loaded on demand):");
  for (const [name, pattern] of Object.entries(LAZY_LIBRARIES)) {
    const holders = [...files.keys()].filter((file) => {
      const mapPath = path.join(outDir, `${file}.map`);
      if (!existsSync(mapPath)) return false;
      const map = JSON.parse(readFileSync(mapPath, "utf8")) as { sources: string[] };
      return map.sources.some((source) => pattern.test(source));
    });
    if (holders.length === 0) {
      console.log(`  ${name.padEnd(30)} not in the build`);
      continue;
    }
    const lazy = holders.every((file) => !files.get(file)!.initial);
    console.log(
      `  ${name.padEnd(30)} ${lazy ? "lazy   " : "INITIAL"} ${holders
        .map((file) => `${file} (${kB(files.get(file)!.gzip)} gzip)`)
        .join(", ")}`,
    );
  }

  const lazyFiles = [...files.entries()].filter(([, size]) => !size.initial);
  console.log(`\nChunks loaded on demand: ${lazyFiles.length}, largest:`);
  for (const [file, size] of lazyFiles.sort((a, b) => b[1].gzip - a[1].gzip).slice(0, 8))
    console.log(`  ${file.padEnd(48)} ${kB(size.gzip).padStart(10)} gzip`);
} finally {
  rmSync(outDir, { recursive: true, force: true });
}
