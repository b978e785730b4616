/**
 * Extra input files a run carries (a researcher's own basis file, a restart file): staged byte for byte
 * into their stage's folder on the development host, part of the fingerprint, listed by size and sha256
 * in the preview, kept on resubmission; bad ones are refused with a 422 naming the field and nothing
 * is stored. Byte identity is checked against the host's files and against coreutils `sha256sum`
 * (an independent implementation of SHA-256, FIPS 180-4) run by the stage itself.
 */
import { createHash } from "node:crypto";
import { readFile } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { MAX_EXTRA_FILE_BYTES } from "../../shared/schemas/run-extra-files";
import { shellCode } from "./support/code-fixtures";
import {
  type EngineScenario,
  type FakeHost,
  registerRecipe,
  registerShellRecipe,
  runSpec,
  type Sigmaflow,
  startEngineScenario,
  waitForState,
} from "./support/lifecycle-harness";
import type { TestDatabase } from "./support/test-database";

let scenario: EngineScenario;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let checksumRecipeId: string;
let twoStageRecipeId: string;

const sha256 = (bytes: Buffer) => createHash("sha256").update(bytes).digest("hex");

/** A basis file as text, and bytes that are not valid UTF-8 (a lone continuation byte, 0xFF, NUL). */
const BASIS = Buffer.from("H 0\nS 1 1.00\n  3.42525091 1.0\n****\n", "utf8");
const RESTART = Buffer.from([0x00, 0xff, 0xfe, 0x80, 0xc3, 0x28, 0x0a, 0x0d, 0x00, 0x7f]);

const extra = (stage: string, fileName: string, bytes: Buffer) => ({
  stage,
  fileName,
  contentBase64: bytes.toString("base64"),
});

async function runCount(): Promise<number> {
  const { rows } = await database.pool.query("select count(*)::int as n from runs");
  return rows[0].n;
}

beforeAll(async () => {
  scenario = await startEngineScenario("extra-files");
  ({ database, sf, host, hostId } = scenario);
  checksumRecipeId = await registerRecipe(sf, "checksums", [
    { name: "check", code: shellCode({ script: "sha256sum basis.gbs restart.bin\n" }) },
  ]);
  twoStageRecipeId = await registerShellRecipe(sf, "extra-two-stage");
}, 60_000);

afterAll(async () => {
  await scenario?.close();
});

describe("a run with extra input files", () => {
  it("stages them byte for byte into the stage's folder and the run reaches done", async () => {
    const body = runSpec(checksumRecipeId, hostId, {}, "with extra files");
    const spec = {
      ...body.spec,
      extraFiles: [extra("check", "basis.gbs", BASIS), extra("check", "restart.bin", RESTART)],
    };
    const created = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, { ...body, spec });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const run = await waitForState(sf, created.body.id, ["done", "failed"]);
    expect(run.state, run.stateMessage).toBe("done");

    const stageDir = path.join(host.rootDir, "runs", `sf-run-${run.id}`, "stage-1-check");
    expect((await readFile(path.join(stageDir, "basis.gbs"))).equals(BASIS)).toBe(true);
    expect((await readFile(path.join(stageDir, "restart.bin"))).equals(RESTART)).toBe(true);

    const log = await sf.api("GET", `/api/runs/${run.id}/log`);
    const text = Buffer.concat(
      log.body.chunks.map((c: { dataBase64: string }) => Buffer.from(c.dataBase64, "base64")),
    ).toString("utf8");
    expect(text).toContain(`${sha256(BASIS)}  basis.gbs`);
    expect(text).toContain(`${sha256(RESTART)}  restart.bin`);

    // Stored with the spec, so a resubmission without changes carries the same files (and fingerprint).
    const again = await sf.api("POST", `/api/runs/${run.id}/resubmit`, { changes: {}, onDuplicate: "run" });
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    const { rows } = await database.pool.query("select id, spec, fingerprint from runs where id = any($1)", [
      [run.id, again.body.id],
    ]);
    const byId = Object.fromEntries(rows.map((r) => [r.id, r]));
    expect(byId[again.body.id].spec.extraFiles).toEqual(spec.extraFiles);
    expect(byId[again.body.id].fingerprint).toBe(byId[run.id].fingerprint);
    await waitForState(sf, again.body.id, ["done", "failed"]);

    // Changed on resubmission: the new list replaces the old one.
    const changed = await sf.api("POST", `/api/runs/${run.id}/resubmit`, {
      changes: { extraFiles: [extra("check", "basis.gbs", BASIS)] },
      onDuplicate: "run",
    });
    expect(changed.status, JSON.stringify(changed.body)).toBe(201);
    const stored = await database.pool.query("select spec from runs where id = $1", [changed.body.id]);
    expect(stored.rows[0].spec.extraFiles).toEqual([extra("check", "basis.gbs", BASIS)]);
    await waitForState(sf, changed.body.id, ["done", "failed"]);
  });

  it("lists them in the preview by size and sha256, and their bytes change the fingerprint", async () => {
    const body = runSpec(twoStageRecipeId, hostId, { prepare: { label: "H2" } }, "preview extra");
    const preview = async (extraFiles?: unknown[]) => {
      const response = await sf.api("POST", `/api/groups/${sf.groupId}/runs/preview`, {
        spec: { ...body.spec, ...(extraFiles ? { extraFiles } : {}) },
      });
      expect(response.status, JSON.stringify(response.body)).toBe(200);
      return response.body;
    };
    const without = await preview();
    const withFile = await preview([extra("scatter", "restart.bin", RESTART)]);
    const changedByte = Buffer.from(RESTART);
    changedByte[3] = 0x81;
    const withOther = await preview([extra("scatter", "restart.bin", changedByte)]);
    const scatter = withFile.stages.find((s: { name: string }) => s.name === "scatter");
    expect(scatter.extraFiles).toEqual([
      { fileName: "restart.bin", sizeBytes: RESTART.length, sha256: sha256(RESTART) },
    ]);
    // The bytes are not echoed among the rendered files.
    expect(scatter.files.map((f: { relativePath: string }) => f.relativePath)).not.toContain(
      "stage-2-scatter/restart.bin",
    );
    expect(new Set([without.fingerprint, withFile.fingerprint, withOther.fingerprint]).size).toBe(3);
    expect((await preview([extra("scatter", "restart.bin", RESTART)])).fingerprint).toBe(
      withFile.fingerprint,
    );
  });
});

describe("bad extra files are refused with a 422 naming the field, and nothing is stored", () => {
  const cases: { label: string; extraFiles: unknown[]; path: string }[] = [
    {
      label: "an unknown stage",
      extraFiles: [extra("nowhere", "a.txt", BASIS)],
      path: "spec.extraFiles.0.stage",
    },
    {
      label: "a name the stage's template renders",
      extraFiles: [extra("prepare", "a.txt", BASIS), extra("prepare", "prepare.sh", BASIS)],
      path: "spec.extraFiles.1.fileName",
    },
    {
      label: "the previous stage's declared output",
      extraFiles: [extra("scatter", "orbitals.dat", BASIS)],
      path: "spec.extraFiles.0.fileName",
    },
    {
      label: "a reserved run file",
      extraFiles: [extra("prepare", "sigmaflow.args", BASIS)],
      path: "spec.extraFiles.0.fileName",
    },
    {
      label: "two files of one name in one stage",
      extraFiles: [extra("prepare", "a.txt", BASIS), extra("prepare", "a.txt", RESTART)],
      path: "spec.extraFiles.1.fileName",
    },
    {
      label: "a path",
      extraFiles: [extra("prepare", "../escape", BASIS)],
      path: "spec.extraFiles.0.fileName",
    },
    {
      label: "an absolute path",
      extraFiles: [extra("prepare", "/etc/passwd", BASIS)],
      path: "spec.extraFiles.0.fileName",
    },
    {
      label: "a shell metacharacter",
      extraFiles: [extra("prepare", "a;rm", BASIS)],
      path: "spec.extraFiles.0.fileName",
    },
    {
      label: "bad base64",
      extraFiles: [{ stage: "prepare", fileName: "a.txt", contentBase64: "not*base64" }],
      path: "spec.extraFiles.0.contentBase64",
    },
    {
      label: "a file over the size limit",
      extraFiles: [extra("prepare", "big.bin", Buffer.alloc(MAX_EXTRA_FILE_BYTES + 1))],
      path: "spec.extraFiles.0.contentBase64",
    },
    {
      label: "more than eight files",
      extraFiles: Array.from({ length: 9 }, (_, i) => extra("prepare", `f${i}.txt`, BASIS)),
      path: "spec.extraFiles",
    },
    {
      label: "more than 384 KiB together",
      extraFiles: Array.from({ length: 4 }, (_, i) =>
        extra("prepare", `f${i}.bin`, Buffer.alloc(100 * 1024)),
      ),
      path: "spec.extraFiles",
    },
  ];

  for (const c of cases) {
    it(`refuses ${c.label}`, async () => {
      const before = await runCount();
      const body = runSpec(twoStageRecipeId, hostId, { prepare: { label: "H2" } }, "bad extra");
      const response = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
        ...body,
        spec: { ...body.spec, extraFiles: c.extraFiles },
      });
      expect(response.status, JSON.stringify(response.body)).toBe(422);
      expect(response.body.error.details.map((d: { path: string }) => d.path)).toContain(c.path);
      expect(await runCount()).toBe(before);
    });
  }
});
