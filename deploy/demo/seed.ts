/**
 * Seeds the demo scenario (idempotent): the demo people as users of the configured identity provider,
 * two research groups and their memberships. Run: `DATABASE_URL=... OIDC_ISSUER=... node --import tsx deploy/demo/seed.ts`.
 */
import { fileURLToPath } from "node:url";
import { sql } from "drizzle-orm";
import { createDatabase, type Database } from "../../server/db/client";
import { groups, memberships, users } from "../../server/db/schema";
import type { GroupRole } from "../../shared/schemas/groups";
import { DEMO_ACCOUNTS } from "./accounts";

export const DEMO_GROUPS = [
  {
    slug: "kestrel-plasma",
    name: "Kestrel Plasma Collisions",
    description:
      "Electron collision data for low-temperature plasma models: elastic, momentum-transfer and excitation cross sections of etch and carrier gases.",
  },
  {
    slug: "marrow-astrochem",
    name: "Marrow Interstellar Chemistry",
    description:
      "Dissociative and rotational electron collisions with interstellar ions and polar molecules; rate coefficients for astrochemical networks.",
  },
] as const;

const DEMO_MEMBERSHIPS: { subject: string; group: (typeof DEMO_GROUPS)[number]["slug"]; role: GroupRole }[] =
  [
    { subject: "demo-group-admin", group: "kestrel-plasma", role: "admin" },
    { subject: "demo-researcher", group: "kestrel-plasma", role: "member" },
    { subject: "demo-collaborator", group: "kestrel-plasma", role: "collaborator" },
    { subject: "demo-other-admin", group: "marrow-astrochem", role: "admin" },
    { subject: "demo-researcher", group: "marrow-astrochem", role: "collaborator" },
  ];

export async function seedDemo(db: Database, issuer: string): Promise<void> {
  await db.transaction(async (tx) => {
    const userIds = new Map<string, string>();
    for (const account of DEMO_ACCOUNTS) {
      const [row] = await tx
        .insert(users)
        .values({
          email: account.email,
          displayName: account.displayName,
          oidcIssuer: issuer,
          oidcSubject: account.subject,
          isSiteAdmin: account.subject === "demo-site-admin",
        })
        .onConflictDoUpdate({
          target: [users.oidcIssuer, users.oidcSubject],
          set: { isSiteAdmin: sql`excluded.is_site_admin` },
        })
        .returning({ id: users.id });
      userIds.set(account.subject, row!.id);
    }
    const groupIds = new Map<string, string>();
    for (const group of DEMO_GROUPS) {
      const [row] = await tx
        .insert(groups)
        .values(group)
        .onConflictDoUpdate({ target: groups.slug, set: { name: group.name } })
        .returning({ id: groups.id });
      groupIds.set(group.slug, row!.id);
    }
    for (const m of DEMO_MEMBERSHIPS) {
      await tx
        .insert(memberships)
        .values({ userId: userIds.get(m.subject)!, groupId: groupIds.get(m.group)!, role: m.role })
        .onConflictDoNothing();
    }
  });
}

if (process.argv[1] === fileURLToPath(import.meta.url)) {
  const url = process.env.DATABASE_URL;
  const issuer = process.env.OIDC_ISSUER;
  if (!url || !issuer) {
    console.error("DATABASE_URL and OIDC_ISSUER must be set");
    process.exit(2);
  }
  const { db, pool } = createDatabase(url);
  await seedDemo(db, issuer.replace(/\/$/, ""));
  await pool.end();
  console.log(`demo scenario seeded: ${DEMO_ACCOUNTS.length} people, ${DEMO_GROUPS.length} groups`);
}
