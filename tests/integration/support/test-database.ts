/**
 * One PostgreSQL database per test file, created from TEST_PG_ADMIN_URL (set by deploy/test.sh) with the
 * real migrations applied, and dropped afterwards.
 */
import { randomBytes } from "node:crypto";
import pg from "pg";
import { createDatabase } from "../../../server/db/client";
import { applyMigrations } from "../../../server/db/migrate";

export function adminUrl(): string {
  const url = process.env.TEST_PG_ADMIN_URL;
  if (!url) throw new Error("TEST_PG_ADMIN_URL is not set: run the suites through `bash deploy/test.sh`.");
  return url;
}

export async function createTestDatabase(label: string) {
  const name = `sf_${label.replace(/[^a-z0-9]/gi, "_").toLowerCase()}_${randomBytes(4).toString("hex")}`;
  const admin = new pg.Client({ connectionString: adminUrl() });
  await admin.connect();
  await admin.query(`create database ${name}`);
  await admin.end();
  const url = new URL(adminUrl());
  url.pathname = `/${name}`;
  await applyMigrations(url.toString());
  const { db, pool } = createDatabase(url.toString());
  return {
    db,
    pool,
    url: url.toString(),
    async drop() {
      await pool.end();
      const client = new pg.Client({ connectionString: adminUrl() });
      await client.connect();
      await client.query(`drop database if exists ${name} with (force)`);
      await client.end();
    },
  };
}
export type TestDatabase = Awaited<ReturnType<typeof createTestDatabase>>;
