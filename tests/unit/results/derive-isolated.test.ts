/**
 * Deriving results in a child process (worker/results/derive-isolated.ts) against the direct call
 * (worker/results/derive-run-results.ts) on the same files: the same rows and notes, the same refusal
 * message, and Sigmaflow's own limits: a derivation past its wall-clock limit is stopped and reported, one
 * past its heap limit likewise (without taking the test process down), and a pool never runs more
 * children than it may.
 *
 * Files: a real psi4 1.3.2 RHF/cc-pVDZ orbital table of water (fixtures/) and synthetic K-matrix tables
 * (support/synthetic-kmatrix.ts).
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { runAnalysisSchema } from "../../../shared/schemas/results";
import {
  DerivationLimitError,
  DerivationPool,
  DerivationRefusedError,
  deriveIsolated,
} from "../../../worker/results/derive-isolated";
import { deriveRunResults, type ResultFile } from "../../../worker/results/derive-run-results";
import { syntheticKMatrixText } from "./support/synthetic-kmatrix";

const analysis = runAnalysisSchema.parse({});
const LIMITS = { timeoutMs: 60_000, maxHeapMb: 512 };
const ORBITALS = readFileSync(
  fileURLToPath(new URL("./fixtures/water-cc-pvdz.orbitals.txt", import.meta.url)),
);

function kMatrixFile(size: { energies: number; irreps: number; channels: number }): ResultFile {
  return {
    stage: "scatter",
    fileName: "kmatrices.txt",
    reader: "kmatrix-table",
    content: Buffer.from(syntheticKMatrixText(size)),
  };
}

const orbitalFile: ResultFile = {
  stage: "orbitals",
  fileName: "orbitals.txt",
  reader: "orbital-table",
  content: ORBITALS,
};

// Each case starts fresh Node child processes; on a busy machine that alone can take seconds.
describe("deriving in a child process", { timeout: 60_000 }, () => {
  it("gives the same rows and notes as the direct call", async () => {
    const files = [orbitalFile, kMatrixFile({ energies: 40, irreps: 4, channels: 5 })];
    const direct = deriveRunResults(files, analysis, { charge: 0 });
    const isolated = await deriveIsolated(files, analysis, { charge: 0 }, LIMITS);
    expect(direct.results.length).toBeGreaterThan(5);
    expect(isolated.derivation).toEqual(direct);
    expect(isolated.usage.peakRssMb).toBeGreaterThan(0);
    // The caller's bytes are left as they were.
    expect(files[0]!.content.byteLength).toBe(ORBITALS.byteLength);
    expect(files[0]!.content.equals(ORBITALS)).toBe(true);
  });

  it("reports the reader's refusal with the reader's message", async () => {
    const text = ORBITALS.toString("utf8").replace(/^(program\b.*)$/m, "$1\nnonsense line");
    const broken: ResultFile = { ...orbitalFile, content: Buffer.from(text) };
    let directMessage = "";
    try {
      deriveRunResults([broken], analysis, { charge: 0 });
    } catch (error) {
      directMessage = (error as Error).message;
    }
    expect(directMessage).not.toBe("");
    const isolated = deriveIsolated([broken], analysis, { charge: 0 }, LIMITS);
    await expect(isolated).rejects.toBeInstanceOf(DerivationRefusedError);
    await expect(isolated).rejects.toThrow(directMessage);
  });

  it("stops a derivation past its wall-clock limit and says so", async () => {
    const files = [kMatrixFile({ energies: 400, irreps: 8, channels: 16 })];
    const start = performance.now();
    deriveRunResults(files, analysis, { charge: null });
    const directMs = performance.now() - start;
    const timeoutMs = 40;
    // The file really takes longer than the limit (on this machine, several times over).
    expect(directMs).toBeGreaterThan(4 * timeoutMs);

    const pool = new DerivationPool(1, { timeoutMs, maxHeapMb: 512 });
    const attempt = pool.derive(files, analysis, { charge: null });
    await expect(attempt).rejects.toBeInstanceOf(DerivationLimitError);
    await expect(attempt).rejects.toThrow("deriving took longer than 0.04 s");
    // The slot is free again: the next derivation runs.
    expect(pool.running).toBe(0);
    const small = [kMatrixFile({ energies: 5, irreps: 1, channels: 1 })];
    const generous = new DerivationPool(1, LIMITS);
    const next = await generous.derive(small, analysis, { charge: null });
    expect(next.derivation).toEqual(deriveRunResults(small, analysis, { charge: null }));
  });

  it("stops a derivation past its heap limit and says so", async () => {
    // A 47 MB table (within the reader's 50 MB): its decoded text alone is more than 32 MB of heap.
    const files = [kMatrixFile({ energies: 2000, irreps: 8, channels: 16 })];
    expect(files[0]!.content.byteLength).toBeGreaterThan(40 * 1024 * 1024);
    const attempt = deriveIsolated(files, analysis, { charge: null }, { timeoutMs: 60_000, maxHeapMb: 32 });
    await expect(attempt).rejects.toBeInstanceOf(DerivationLimitError);
    await expect(attempt).rejects.toThrow("deriving needed more than the 32 MB of memory allowed");
  });

  it("runs at most maxChildren derivations at once; the others wait their turn", async () => {
    const pool = new DerivationPool(1, LIMITS);
    const files = [kMatrixFile({ energies: 20, irreps: 2, channels: 3 })];
    const direct = deriveRunResults(files, analysis, { charge: null });
    let most = 0;
    const sampler = setInterval(() => {
      most = Math.max(most, pool.running);
    }, 5);
    try {
      const all = await Promise.all([1, 2, 3].map(() => pool.derive(files, analysis, { charge: null })));
      for (const { derivation } of all) expect(derivation).toEqual(direct);
    } finally {
      clearInterval(sampler);
    }
    expect(most).toBe(1);
    expect(pool.running).toBe(0);
  });
});
