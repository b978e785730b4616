import type { GroupRole } from "@shared/schemas";

export const GROUP_ROLES: readonly GroupRole[] = ["collaborator", "member", "admin"];

export const ROLE_LABELS: Record<GroupRole, string> = {
  collaborator: "Collaborator",
  member: "Member",
  admin: "Admin",
};

/** What each role may do, worded for the people choosing it. */
export const ROLE_DESCRIPTIONS: Record<GroupRole, string> = {
  collaborator: "Reads the group's results; cannot submit work.",
  member: "Submits and manages calculations on the group's clusters.",
  admin: "Also manages members, invitations and quotas.",
};
