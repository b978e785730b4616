/**
 * `db.transaction` gives its pooled client back on every path, including a `begin` that fails because
 * the connection died between check-out and the first statement (what a PostgreSQL restart does to a
 * busy worker). A client kept by such a failure starves a small pool and makes `pool.end()` wait forever,
 * so the worker could not stop.
 */
import { sql } from "drizzle-orm";
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDatabase } from "../../server/db/client";
import { createTestDatabase, type TestDatabase } from "./support/test-database";

let database: TestDatabase;

beforeAll(async () => {
  database = await createTestDatabase("transactions");
});

afterAll(async () => {
  await database?.drop();
});

/** Cuts the socket of the next client the pool hands out, before the caller sends anything on it. */
function cutNextCheckout(pool: pg.Pool) {
  pool.once("acquire", (client) => {
    (client as unknown as { connection: { stream: { destroy(): void } } }).connection.stream.destroy();
  });
}

describe("db.transaction on the pool", () => {
  it("releases a client whose connection is gone before begin, so a one-client pool still serves", async () => {
    const { db, pool } = createDatabase(database.url, { maxConnections: 1 });
    try {
      cutNextCheckout(pool);
      await expect(db.transaction(async (tx) => tx.execute(sql`select 1 as one`))).rejects.toThrow();
      // A kept client would leave the pool empty: this check-out would time out after 5 s.
      const result = await db.transaction(async (tx) => tx.execute(sql`select 2 as two`));
      expect(result.rows).toEqual([{ two: 2 }]);
      expect(pool.totalCount).toBe(1);
    } finally {
      await pool.end();
    }
    expect(pool.totalCount).toBe(0);
  });

  it("commits on success and rolls back when the callback throws, releasing the client each time", async () => {
    const { db, pool } = createDatabase(database.url, { maxConnections: 1 });
    try {
      await db.execute(sql`create table if not exists tx_probe (n int)`);
      await db.transaction(async (tx) => tx.execute(sql`insert into tx_probe values (1)`));
      await expect(
        db.transaction(async (tx) => {
          await tx.execute(sql`insert into tx_probe values (2)`);
          throw new Error("refused by the caller");
        }),
      ).rejects.toThrow("refused by the caller");
      const rows = await db.execute(sql`select n from tx_probe order by n`);
      expect(rows.rows).toEqual([{ n: 1 }]);
      expect(pool.idleCount).toBe(1);
    } finally {
      await pool.end();
    }
  });
});
