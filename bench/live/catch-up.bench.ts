/**
 * A late joiner's catch-up on a stored log, as the live feed reads it (server/realtime/log-feed.ts): every
 * chunk after sequence number 0, page by page until the reader says no more follow. Compares pages of 32
 * chunks (`readRunLogChunks`, the feed's reader before) with pages capped by bytes (`readRunLogPage`: up to
 * 4 MiB, at most 1 024 chunks, what the feed reads now), for a streamed log (many small chunks, as the
 * worker stores a line or a few every 50 ms) and a polled one (256 KiB chunks).
 *
 * Run: node --import tsx bench/live/catch-up.bench.ts [smallChunks=20000] [--repeat=5]
 *
 * A private PostgreSQL (fsync on) with Sigmaflow's migrations; one run's chunks are inserted directly.
 * Each figure is the median (and max) of `repeat` full catch-ups after one warm-up, with the number of
 * queries one catch-up makes and the bytes it reads.
 */
import { sql } from "drizzle-orm";
import { createDatabase, type Database } from "../../server/db/client";
import { runLogChunks } from "../../server/db/schema";
import { readRunLogChunks, readRunLogPage } from "../../server/services/run-log.service";
import { insertRuns, seedRunListGroup, spreadRuns } from "../../tests/integration/support/run-list-seed";
import { startBenchDatabase } from "../support/bench-database";

const smallChunks = Number(process.argv.slice(2).find((arg) => /^\d+$/.test(arg)) ?? 20_000);
const repeat = Number(process.argv.find((arg) => arg.startsWith("--repeat="))?.split("=")[1] ?? 5);

async function storeChunks(db: Database, runId: string, count: number, bytesEach: number) {
  const line = "symmetry B2u: step 17 of 40, residual 3.1e-07\n";
  const content = Buffer.from(line.repeat(Math.ceil(bytesEach / line.length)).slice(0, bytesEach));
  for (let start = 0; start < count; start += 500) {
    const rows = [];
    for (let i = start; i < Math.min(count, start + 500); i++) {
      rows.push({ runId, seq: i + 1, offsetBytes: i * bytesEach, content });
    }
    await db.insert(runLogChunks).values(rows);
  }
}

type CatchUp = { queries: number; chunks: number; bytes: number };

async function byCount(db: Database, runId: string): Promise<CatchUp> {
  const result = { queries: 0, chunks: 0, bytes: 0 };
  let after = 0;
  for (;;) {
    const page = await readRunLogChunks(db, runId, after, 32);
    result.queries += 1;
    for (const chunk of page) result.bytes += chunk.content.byteLength;
    result.chunks += page.length;
    if (page.length < 32) return result;
    after = page.at(-1)!.seq;
  }
}

async function byBytes(db: Database, runId: string): Promise<CatchUp> {
  const result = { queries: 0, chunks: 0, bytes: 0 };
  let after = 0;
  for (;;) {
    const page = await readRunLogPage(db, runId, after, 1024, 4 * 1024 * 1024);
    result.queries += 2; // the sizes, then the chosen chunks
    for (const chunk of page.chunks) result.bytes += chunk.content.byteLength;
    result.chunks += page.chunks.length;
    if (!page.more || page.chunks.length === 0) return result;
    after = page.chunks.at(-1)!.seq;
  }
}

async function time(read: () => Promise<CatchUp>) {
  await read();
  const ms: number[] = [];
  let last: CatchUp = { queries: 0, chunks: 0, bytes: 0 };
  for (let i = 0; i < repeat; i++) {
    const start = performance.now();
    last = await read();
    ms.push(performance.now() - start);
  }
  ms.sort((a, b) => a - b);
  return { median: ms[Math.floor(ms.length / 2)]!, max: ms.at(-1)!, ...last };
}

const { postgres, url } = await startBenchDatabase();
try {
  const { db, pool } = createDatabase(url);
  const group = await seedRunListGroup(db, "bench-catch-up");
  const [streamed, polled] = await insertRuns(db, group, spreadRuns(group, 2, { seed: 3 }));
  await storeChunks(db, streamed!, smallChunks, 150);
  await storeChunks(db, polled!, 40, 256 * 1024);
  await db.execute(sql`vacuum analyze run_log_chunks`);

  for (const [label, runId] of [
    [`streamed log: ${smallChunks} chunks of 150 B`, streamed!],
    ["polled log: 40 chunks of 256 KiB", polled!],
  ] as const) {
    console.log(label);
    for (const [reader, read] of [
      ["pages of 32 chunks ", byCount],
      ["pages of up to 4 MiB", byBytes],
    ] as const) {
      const t = await time(() => read(db, runId));
      console.log(
        `  ${reader}: median ${t.median.toFixed(1)} ms (max ${t.max.toFixed(1)} ms), ${t.queries} queries, ${t.chunks} chunks, ${(t.bytes / 1048576).toFixed(2)} MiB`,
      );
    }
  }
  await pool.end();
} finally {
  await postgres.stop();
}
