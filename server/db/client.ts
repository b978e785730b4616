import { drizzle } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "./schema";

export function createDatabase(databaseUrl: string, options: { maxConnections?: number } = {}) {
  const pool = new pg.Pool({
    connectionString: databaseUrl,
    max: options.maxConnections ?? 10,
    connectionTimeoutMillis: 5_000,
  });
  // An idle client that loses its connection (e.g. PostgreSQL restarting) must not crash the process;
  // the pool replaces it on next use.
  pool.on("error", () => {});
  // A client checked out while the server goes away emits "error" itself; its query rejects anyway, so
  // the listener only keeps the event from crashing the process.
  pool.on("connect", (client) => client.on("error", () => {}));
  const db = drizzle(pool, { schema });
  return { pool, db };
}

export type Database = ReturnType<typeof createDatabase>["db"];
/** A database handle or an open transaction: services accept either. */
export type DbExecutor = Database | Parameters<Parameters<Database["transaction"]>[0]>[0];
