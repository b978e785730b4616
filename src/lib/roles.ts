import { type GroupRole, groupRoleSchema } from "@shared/schemas";

/** From least to most access, as the schema lists them. */
export const GROUP_ROLES: readonly GroupRole[] = groupRoleSchema.options;

export const ROLE_LABELS: Record<GroupRole, string> = {
  collaborator: "Collaborator",
  member: "Member",
  admin: "Admin",
};

/** What each role may do, worded for the people choosing it. */
export const ROLE_DESCRIPTIONS: Record<GroupRole, string> = {
  collaborator: "Reads the group's runs and results; cannot submit runs.",
  member: "Submits and manages runs on the group's hosts, registers codes and recipes.",
  admin: "Also manages members, invitations, hosts and allocations.",
};
