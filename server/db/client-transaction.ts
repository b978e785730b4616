import { drizzle } from "drizzle-orm/node-postgres";
import type pg from "pg";
import type { Database } from "./client";
import * as schema from "./schema";

/**
 * A transaction on one pooled connection, exposed both as Drizzle and as the raw client. pg-boss can then
 * insert its queue item through the same connection (`send(..., { db })`), so a run row and the item that
 * will carry it commit or roll back together.
 */
export async function withClientTransaction<T>(
  pool: pg.Pool,
  fn: (tx: {
    db: Database;
    executeSql: (text: string, values: unknown[]) => Promise<{ rows: unknown[] }>;
  }) => Promise<T>,
): Promise<T> {
  const client = await pool.connect();
  try {
    await client.query("begin");
    const db = drizzle(client, { schema }) as unknown as Database;
    const result = await fn({ db, executeSql: (text, values) => client.query(text, values as unknown[]) });
    await client.query("commit");
    return result;
  } catch (error) {
    await client.query("rollback").catch(() => {});
    throw error;
  } finally {
    client.release();
  }
}
