/**
 * A run's stored log is the job's log file byte for byte: a job on the development host writes 200 000
 * lines of multi-byte UTF-8 (é = 2 bytes, 😀 = 4 bytes, RFC 3629 §3), lines of 100 kB and one longer than
 * a poll's read (worker/steps/poll.ts reads 256 KiB per round), carriage returns, ANSI colour escapes
 * and bytes that are not UTF-8 at all (support/hostile-log.ts). The log the API serves (`/log/raw`, and
 * the pages of `/log`) must have the file's length and sha256, with sequence numbers 1..N, each chunk
 * starting where the previous ended, also when the worker is SIGKILLed while the log streams and started
 * again.
 */
import type { ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import { readFile, stat } from "node:fs/promises";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { killHard, runDirOnHost } from "./support/fault-helpers";
import { expectHostileLog, hostileLogCode, sha256 } from "./support/hostile-log";
import {
  type FakeHost,
  registerDevHost,
  registerRecipe,
  runSpec,
  type Sigmaflow,
  startFakeHost,
  startSigmaflow,
  waitForState,
} from "./support/lifecycle-harness";
import { tokenFor } from "./support/people";
import { createTestDatabase, type TestDatabase } from "./support/test-database";
import { waitFor } from "./support/wait-for";

/** worker/steps/poll.ts MAX_LOG_BYTES_PER_POLL: the most one read of a log takes. */
const READ_BYTES = 256 * 1024;
let database: TestDatabase;
let sf: Sigmaflow;
let host: FakeHost;
let hostId: string;
let recipeId: string;
let token: string;
let worker: ChildProcess;

beforeAll(async () => {
  database = await createTestDatabase("log_bytes");
  sf = await startSigmaflow(database, { inProcessWorker: false });
  host = await startFakeHost();
  hostId = await registerDevHost(sf, host, { name: "log-host" });
  recipeId = await registerRecipe(sf, "log-bytes", [
    {
      name: "emit",
      code: hostileLogCode("log-bytes"),
    },
  ]);
  token = await tokenFor(database.db, sf.researcher);
  worker = sf.spawnWorker();
}, 60_000);

afterAll(async () => {
  await sf?.close();
  await host?.stop();
  await database?.drop();
});

async function submit(name: string, pause: number, onDuplicate: "run" | "reuse" = "run") {
  const created = await sf.api("POST", `/api/groups/${sf.groupId}/runs`, {
    ...runSpec(recipeId, hostId, { emit: { pause } }, name),
    onDuplicate,
  });
  expect(created.status, JSON.stringify(created.body)).toBe(201);
  return created.body as { id: string; reusedFrom: string | null };
}

const jobLogPath = (runId: string) => path.join(runDirOnHost(host.rootDir, runId), "job.log");

async function downloadRaw(runId: string) {
  const response = await fetch(`${sf.app.baseUrl}/api/runs/${runId}/log/raw`, {
    headers: { authorization: `Bearer ${token}` },
  });
  return { response, bytes: Buffer.from(await response.arrayBuffer()) };
}

type StoredChunk = { seq: number; offsetBytes: number; content: Buffer };

async function storedChunks(runId: string): Promise<StoredChunk[]> {
  const { rows } = await database.pool.query(
    "select seq, offset_bytes, content from run_log_chunks where run_id = $1 order by seq",
    [runId],
  );
  return rows.map((row) => ({ seq: row.seq, offsetBytes: Number(row.offset_bytes), content: row.content }));
}

/** Sequence numbers 1..N, each chunk starting where the previous one ended: nothing lost or doubled. */
function expectContiguous(chunks: StoredChunk[], file: Buffer) {
  expect(chunks.map((chunk) => chunk.seq)).toEqual(chunks.map((_, i) => i + 1));
  let offset = 0;
  for (const chunk of chunks) {
    expect(chunk.offsetBytes, `chunk ${chunk.seq}`).toBe(offset);
    offset += chunk.content.length;
  }
  expect(offset).toBe(file.length);
  expect(sha256(Buffer.concat(chunks.map((chunk) => chunk.content)))).toBe(sha256(file));
}

async function logSeq(runId: string): Promise<number> {
  const { rows } = await database.pool.query("select log_seq from runs where id = $1", [runId]);
  return rows[0].log_seq;
}

describe("a run's log, byte for byte", () => {
  it("serves exactly the bytes the job wrote, whole and page by page, also for a run that reuses it", async () => {
    const run = await submit("bytes", 0.2);
    const done = await waitForState(sf, run.id, ["done", "failed", "cancelled"], 120_000);
    expect(done.state, done.stateMessage).toBe("done");
    const file = await readFile(jobLogPath(run.id));
    // The job really wrote what this test is about.
    expect(file.length).toBeGreaterThan(8 * READ_BYTES);
    expectHostileLog(file);

    const raw = await downloadRaw(run.id);
    expect(raw.response.status).toBe(200);
    expect(raw.response.headers.get("content-type")).toBe("application/octet-stream");
    expect(raw.response.headers.get("content-disposition")).toBe(`attachment; filename="run-${run.id}.log"`);
    expect(Number(raw.response.headers.get("content-length"))).toBe(file.length);
    expect(raw.bytes.length).toBe(file.length);
    expect(sha256(raw.bytes)).toBe(sha256(file));

    const chunks = await storedChunks(run.id);
    expectContiguous(chunks, file);
    // The log was stored in many polls, some while the job ran (it pauses 0.2 s between batches).
    expect(chunks.length).toBeGreaterThan(10);
    // The line longer than a read: its first chunk stops 3 bytes short of 256 KiB, before the 😀 the
    // read would have cut (1 + 4 × 65 535 bytes), and the next chunk starts with that 😀 whole.
    const longLineAt = file.indexOf(Buffer.from(`\nx${"😀".repeat(4)}`)) + 1;
    const first = chunks.find((chunk) => chunk.offsetBytes === longLineAt);
    expect(first?.content.length).toBe(1 + 4 * 65_535);
    const next = chunks[chunks.indexOf(first!) + 1]!;
    expect(next.content.subarray(0, 4)).toEqual(Buffer.from("😀"));
    // Everything else was cut after a newline, except the very end: the job ended on a cut 😀.
    const cutElsewhere = chunks.filter((chunk) => chunk !== first && chunk.content.at(-1) !== 0x0a);
    expect(cutElsewhere.map((chunk) => chunk.seq)).toEqual(file.at(-1) === 0x0a ? [] : [chunks.at(-1)!.seq]);

    // Pages of the JSON API join to the same bytes; `done` only on the page that reaches the end.
    const pages: Buffer[] = [];
    let afterSeq = 0;
    for (let page = 0; ; page += 1) {
      expect(page).toBeLessThan(chunks.length);
      const reply = await sf.api("GET", `/api/runs/${run.id}/log?afterSeq=${afterSeq}&limit=7`);
      expect(reply.status).toBe(200);
      for (const chunk of reply.body.chunks) pages.push(Buffer.from(chunk.dataBase64, "base64"));
      afterSeq = reply.body.lastSeq;
      expect(reply.body.done).toBe(afterSeq === chunks.length);
      if (reply.body.done) break;
    }
    expect(sha256(Buffer.concat(pages))).toBe(sha256(file));

    // A run that reuses these results has no log of its own: it serves this one.
    const reused = await submit("bytes", 0.2, "reuse");
    expect(reused.reusedFrom).toBe(run.id);
    const reusedRaw = await downloadRaw(reused.id);
    expect(reusedRaw.response.status).toBe(200);
    expect(sha256(reusedRaw.bytes)).toBe(sha256(file));
  }, 180_000);

  it("migration 0008 turns chunks stored as text into that text's UTF-8 bytes", async () => {
    // The table as drizzle/0001 created it, in a schema of its own, with chunks as the poller stored them.
    const client = await database.pool.connect();
    try {
      await client.query("create schema log_text_era");
      await client.query("set search_path to log_text_era");
      await client.query(`create table run_log_chunks (
        run_id uuid not null, seq integer not null, offset_bytes bigint not null, text text not null,
        at timestamp with time zone default now() not null, primary key (run_id, seq))`);
      const texts = ["é😀 done\r\n", "\u001b[31mred\u001b[0m \ufffd\n", ""];
      for (const [i, text] of texts.entries())
        await client.query(
          "insert into run_log_chunks (run_id, seq, offset_bytes, text) values ($1, $2, 0, $3)",
          ["00000000-0000-4000-8000-000000000001", i + 1, text],
        );
      const migration = await readFile(path.join("drizzle", "0008_log_chunk_bytes.sql"), "utf8");
      for (const statement of migration.split("--> statement-breakpoint")) await client.query(statement);
      const { rows } = await client.query("select seq, content from run_log_chunks order by seq");
      expect(rows.map((row) => row.content)).toEqual(texts.map((text) => Buffer.from(text, "utf8")));
      const { rows: columns } = await client.query(
        "select column_name, is_nullable from information_schema.columns where table_schema = 'log_text_era' and table_name = 'run_log_chunks' and column_name in ('text', 'content')",
      );
      expect(columns).toEqual([{ column_name: "content", is_nullable: "NO" }]);
    } finally {
      await client.query("reset search_path");
      await client.query("drop schema if exists log_text_era cascade");
      client.release();
    }
  });

  it("refuses a page size or sequence number out of bounds, naming it", async () => {
    const run = await submit("bounds", 0);
    for (const [query, field] of [
      ["limit=0", "limit"],
      ["limit=2001", "limit"],
      ["limit=ten", "limit"],
      ["afterSeq=-1", "afterSeq"],
    ] as const) {
      const reply = await sf.api("GET", `/api/runs/${run.id}/log?${query}`);
      expect(reply.status, query).toBe(422);
      expect(reply.body.error.message, query).toContain(field);
    }
    await waitForState(sf, run.id, ["done", "failed", "cancelled"], 120_000);
  }, 180_000);

  it("stays byte-identical, with no chunk lost or doubled, when the worker is SIGKILLed mid-stream", async () => {
    const run = await submit("killed", 1);
    for (let kill = 1; kill <= 2; kill += 1) {
      // Kill once some chunks are stored and more are coming.
      const seqAtKill = await waitFor(
        `chunks of run ${run.id} to be stored (kill ${kill})`,
        () => logSeq(run.id),
        (seq) => seq >= kill + 1,
        { timeoutMs: 60_000 },
      );
      await killHard(worker);
      const sizeAtKill = (await stat(jobLogPath(run.id))).size;
      // The job goes on writing with no worker following it (unless it has just ended).
      await waitFor(
        "the job to write more while no worker runs",
        async () => ({
          size: (await stat(jobLogPath(run.id))).size,
          ended: existsSync(path.join(runDirOnHost(host.rootDir, run.id), "job.ended")),
        }),
        (job) => job.size > sizeAtKill || job.ended,
        { timeoutMs: 30_000 },
      );
      worker = sf.spawnWorker();
      await waitFor(
        "the restarted worker to store more of the log",
        () => logSeq(run.id),
        (seq) => seq > seqAtKill,
        { timeoutMs: 60_000 },
      );
    }
    const done = await waitForState(sf, run.id, ["done", "failed", "cancelled"], 120_000);
    expect(done.state, done.stateMessage).toBe("done");
    const file = await readFile(jobLogPath(run.id));
    expectContiguous(await storedChunks(run.id), file);
    const raw = await downloadRaw(run.id);
    expect(raw.bytes.length).toBe(file.length);
    expect(sha256(raw.bytes)).toBe(sha256(file));
  }, 240_000);
});
