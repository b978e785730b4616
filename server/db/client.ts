import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
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
  db.transaction = transactionReleasingItsClient(pool);
  return { pool, db };
}

/**
 * `db.transaction` on a pool, with its client released on every path. Drizzle's own pool transaction
 * (0.45) sends `begin` before its try/finally, so a `begin` that fails (the server went away between
 * check-out and the first statement, as when PostgreSQL restarts) never gives the client back; the pool
 * then runs short by one and `pool.end()` waits for it forever. Here the client is checked out once and
 * the transaction runs on it; a broken client is dropped by the pool on release.
 */
function transactionReleasingItsClient(pool: pg.Pool): NodePgDatabase<typeof schema>["transaction"] {
  // Building a Drizzle handle reads the whole schema (~0.2 ms); the pool reuses its clients, so each
  // client gets its handle once.
  const handles = new WeakMap<pg.PoolClient, NodePgDatabase<typeof schema>>();
  return async (fn, config) => {
    const client = await pool.connect();
    try {
      let handle = handles.get(client);
      if (!handle) {
        handle = drizzle(client, { schema });
        handles.set(client, handle);
      }
      return await handle.transaction(fn, config);
    } finally {
      client.release();
    }
  };
}

export type Database = ReturnType<typeof createDatabase>["db"];
/** A database handle or an open transaction: services accept either. */
export type DbExecutor = Database | Parameters<Parameters<Database["transaction"]>[0]>[0];
