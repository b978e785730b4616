import { and, desc, eq, gt, isNull, sql } from "drizzle-orm";
import type { GroupRole } from "../../shared/schemas/groups";
import type {
  CreateInvitationRequest,
  Invitation,
  InvitationPreview,
} from "../../shared/schemas/invitations";
import { recordAudit } from "../audit/record-audit";
import type { Principal } from "../auth/principal";
import { hashSecret, newSecret } from "../auth/tokens";
import type { Database } from "../db/client";
import { groups, invitations, memberships, users } from "../db/schema";
import { AppError, conflict, forbidden, notFound } from "../http/errors";
import type { Mailer } from "../mail/mailer";
import { invitationMail } from "../mail/templates";
import { requireGroupRole } from "./access";

type InvitationRow = typeof invitations.$inferSelect;

function statusOf(row: InvitationRow, now = new Date()): Invitation["status"] {
  if (row.acceptedAt) return "accepted";
  if (row.revokedAt) return "revoked";
  if (row.expiresAt <= now) return "expired";
  return "pending";
}

export type InvitationDeps = { db: Database; mailer: Mailer; publicUrl: string; ttlDays: number };

export async function listInvitations(
  db: Database,
  principal: Principal,
  groupId: string,
): Promise<Invitation[]> {
  await requireGroupRole(db, principal, groupId, "admin");
  const rows = await db
    .select({ invitation: invitations, invitedBy: users.displayName })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.groupId, groupId))
    .orderBy(desc(invitations.createdAt));
  return rows.map(({ invitation, invitedBy }) => toInvitation(invitation, invitedBy));
}

function toInvitation(row: InvitationRow, invitedBy: string | null): Invitation {
  return {
    id: row.id,
    groupId: row.groupId,
    email: row.email,
    role: row.role,
    status: statusOf(row),
    invitedBy: invitedBy ?? "a former member",
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
  };
}

/**
 * Invites an e-mail address into a group. A pending invitation to the same address is replaced (the old
 * link stops working). The mail is sent inside the transaction: if it cannot be sent, nothing is kept.
 */
export async function createInvitation(
  deps: InvitationDeps,
  principal: Principal,
  groupId: string,
  input: { email: string; role: GroupRole },
  ip: string | null,
): Promise<Invitation> {
  const { db } = deps;
  await requireGroupRole(db, principal, groupId, "admin");
  return db.transaction(async (tx) => {
    const [group] = await tx.select().from(groups).where(eq(groups.id, groupId));
    if (!group) throw notFound("Group");
    const existingMember = await tx
      .select({ userId: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.groupId, groupId), sql`lower(${users.email}) = ${input.email}`));
    if (existingMember.length > 0) {
      throw conflict(`${input.email} is already a member of ${group.name}.`, { path: "email" });
    }
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(
        and(
          eq(invitations.groupId, groupId),
          eq(invitations.email, input.email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, new Date()),
        ),
      );
    const secret = newSecret("", 32);
    const expiresAt = new Date(Date.now() + deps.ttlDays * 86_400_000);
    const [row] = await tx
      .insert(invitations)
      .values({
        groupId,
        email: input.email,
        role: input.role,
        tokenHash: hashSecret(secret),
        invitedBy: principal.userId,
        expiresAt,
      })
      .returning();
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "invitation.create",
      targetType: "invitation",
      targetId: row!.id,
      details: { email: input.email, role: input.role },
      ip,
    });
    const mail = invitationMail({
      to: input.email,
      groupName: group.name,
      inviterName: principal.displayName,
      role: input.role,
      link: `${deps.publicUrl}/invitations/${secret}`,
      expiresAt,
    });
    try {
      await deps.mailer.send(mail);
    } catch (error) {
      throw new AppError(
        502,
        "mail_failed",
        "The invitation e-mail could not be sent; nothing was saved. Try again.",
        {
          reason: (error as Error).message,
        },
      );
    }
    return toInvitation(row!, principal.displayName);
  });
}

export async function revokeInvitation(
  db: Database,
  principal: Principal,
  groupId: string,
  invitationId: string,
  ip: string | null,
): Promise<void> {
  await requireGroupRole(db, principal, groupId, "admin");
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(
        and(
          eq(invitations.id, invitationId),
          eq(invitations.groupId, groupId),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      )
      .returning({ id: invitations.id, email: invitations.email });
    if (!row) throw notFound("Pending invitation");
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId,
      action: "invitation.revoke",
      targetType: "invitation",
      targetId: row.id,
      details: { email: row.email },
      ip,
    });
  });
}

async function findByToken(db: Database, token: string) {
  const [found] = await db
    .select({
      invitation: invitations,
      groupName: groups.name,
      groupSlug: groups.slug,
      invitedBy: users.displayName,
    })
    .from(invitations)
    .innerJoin(groups, eq(groups.id, invitations.groupId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashSecret(token)));
  if (!found) throw notFound("Invitation");
  return found;
}

export async function previewInvitation(db: Database, token: string): Promise<InvitationPreview> {
  const found = await findByToken(db, token);
  return {
    groupName: found.groupName,
    groupSlug: found.groupSlug,
    email: found.invitation.email,
    role: found.invitation.role,
    status: statusOf(found.invitation),
    invitedBy: found.invitedBy ?? "a former member",
    expiresAt: found.invitation.expiresAt.toISOString(),
  };
}

export async function acceptInvitation(
  db: Database,
  principal: Principal,
  token: string,
  ip: string | null,
): Promise<{ groupId: string; role: GroupRole }> {
  const found = await findByToken(db, token);
  const { invitation } = found;
  const status = statusOf(invitation);
  if (status === "revoked") throw new AppError(410, "invitation_revoked", "This invitation was withdrawn.");
  if (status === "expired")
    throw new AppError(410, "invitation_expired", "This invitation has expired: ask for a new one.");
  if (status === "accepted") throw conflict("This invitation has already been used.");
  if (invitation.email !== principal.email.toLowerCase()) {
    throw forbidden(
      `This invitation is for ${invitation.email}, but you are signed in as ${principal.email}.`,
    );
  }
  return db.transaction(async (tx) => {
    const claimed = await tx
      .update(invitations)
      .set({ acceptedAt: new Date(), acceptedBy: principal.userId })
      .where(
        and(eq(invitations.id, invitation.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)),
      )
      .returning({ id: invitations.id });
    if (claimed.length === 0) throw conflict("This invitation has already been used.");
    const inserted = await tx
      .insert(memberships)
      .values({ userId: principal.userId, groupId: invitation.groupId, role: invitation.role })
      .onConflictDoNothing()
      .returning({ role: memberships.role });
    if (inserted.length === 0) throw conflict(`You are already a member of ${found.groupName}.`);
    await recordAudit(tx, {
      actorUserId: principal.userId,
      groupId: invitation.groupId,
      action: "invitation.accept",
      targetType: "invitation",
      targetId: invitation.id,
      details: { role: invitation.role },
      ip,
    });
    return { groupId: invitation.groupId, role: invitation.role };
  });
}

export type { CreateInvitationRequest };
