/**
 * A benchmark's database: a private PostgreSQL (tests/integration/support/private-postgres.ts, fsync on
 * unless asked otherwise) with a database `sigmaflow_bench` carrying Sigmaflow's migrations.
 */
import pg from "pg";
import { applyMigrations } from "../../server/db/migrate";
import { startPrivatePostgres } from "../../tests/integration/support/private-postgres";

export async function startBenchDatabase(
  options: Parameters<typeof startPrivatePostgres>[0] = { durable: true },
) {
  const postgres = await startPrivatePostgres(options);
  try {
    const admin = new pg.Client({ connectionString: postgres.adminUrl });
    await admin.connect();
    await admin.query("create database sigmaflow_bench");
    await admin.end();
    const url = postgres.adminUrl.replace(/\/postgres$/, "/sigmaflow_bench");
    await applyMigrations(url);
    return { postgres, url };
  } catch (error) {
    await postgres.stop();
    throw error;
  }
}
