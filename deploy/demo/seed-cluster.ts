/**
 * Registers the development cluster host in the demo scenario (idempotent), through the same services
 * the API uses: the Kestrel group gets host `kestrel-dev` (key fetched and confirmed by its admin), a
 * group account whose generated public key is installed in the host's authorized_keys, and a core-hour
 * allocation for the current quarter. Run by deploy/start.sh once the fake cluster listens.
 */
import { appendFile, readFile } from "node:fs/promises";
import { fileURLToPath } from "node:url";
import { and, eq, isNull } from "drizzle-orm";
import type { Principal } from "../../server/auth/principal";
import { createDatabase } from "../../server/db/client";
import { groups, hostAccounts, hosts, users } from "../../server/db/schema";
import { fetchHostKey } from "../../server/hosts/host-key-probe";
import { activeAllocation, createAllocation } from "../../server/services/allocations.service";
import { createHostAccount } from "../../server/services/host-accounts.service";
import { confirmHostKey, createHost } from "../../server/services/hosts.service";

const env = {
  databaseUrl: process.env.DATABASE_URL,
  secretsKey: process.env.SIGMAFLOW_SECRETS_KEY,
  port: Number(process.env.FAKE_CLUSTER_PORT ?? 5184),
  authorizedKeys: process.env.FAKE_CLUSTER_AUTHORIZED_KEYS,
};

export async function seedDemoCluster(): Promise<string> {
  if (!env.databaseUrl || !env.secretsKey || !env.authorizedKeys) {
    throw new Error("DATABASE_URL, SIGMAFLOW_SECRETS_KEY and FAKE_CLUSTER_AUTHORIZED_KEYS must be set");
  }
  const { db, pool } = createDatabase(env.databaseUrl);
  try {
    const [group] = await db.select().from(groups).where(eq(groups.slug, "kestrel-plasma"));
    const [admin] = await db.select().from(users).where(eq(users.oidcSubject, "demo-group-admin"));
    if (!group || !admin) throw new Error("seed the demo scenario first (deploy/demo/seed.ts)");
    const principal: Principal = {
      userId: admin.id,
      email: admin.email,
      displayName: admin.displayName,
      isSiteAdmin: false,
      via: "session",
    };

    let [host] = await db
      .select()
      .from(hosts)
      .where(and(eq(hosts.groupId, group.id), eq(hosts.name, "kestrel-dev")));
    if (!host) {
      const created = await createHost(
        { db, fetchHostKey },
        principal,
        group.id,
        {
          name: "kestrel-dev",
          address: "127.0.0.1",
          port: env.port,
          scheduler: "direct",
          remoteBaseDir: "runs",
          maxConcurrentRuns: 50,
        },
        null,
      );
      await confirmHostKey(db, principal, created.id, created.hostKeyFingerprint!, null);
      [host] = await db.select().from(hosts).where(eq(hosts.id, created.id));
    }
    const [account] = await db
      .select()
      .from(hostAccounts)
      .where(and(eq(hostAccounts.hostId, host!.id), isNull(hostAccounts.ownerUserId)));
    const publicKey =
      account?.publicKey ??
      (
        await createHostAccount(
          { db, config: { secretsKey: env.secretsKey } },
          principal,
          host!.id,
          { kind: "group", username: "sigmaflow" },
          null,
        )
      ).publicKey;
    const installed = await readFile(env.authorizedKeys, "utf8").catch(() => "");
    if (!installed.includes(publicKey)) await appendFile(env.authorizedKeys, `${publicKey}\n`);

    if (!(await db.transaction((tx) => activeAllocation(tx, group.id, new Date())))) {
      const now = new Date();
      const quarterStart = new Date(Date.UTC(now.getUTCFullYear(), Math.floor(now.getUTCMonth() / 3) * 3, 1));
      const quarterEnd = new Date(Date.UTC(quarterStart.getUTCFullYear(), quarterStart.getUTCMonth() + 3, 1));
      await createAllocation(
        db,
        principal,
        group.id,
        {
          name: `Kestrel ${now.getUTCFullYear()} Q${Math.floor(now.getUTCMonth() / 3) + 1}`,
          coreHours: 50_000,
          startsAt: quarterStart.toISOString(),
          endsAt: quarterEnd.toISOString(),
        },
        null,
      );
    }
    return host!.name;
  } finally {
    await pool.end();
  }
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const name = await seedDemoCluster();
  console.log(`development host ${name} registered for Kestrel Plasma Collisions`);
}
