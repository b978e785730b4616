/** Sections of a group's workspace, in the order the navigation lists them. */
export const GROUP_SECTIONS = [
  "targets",
  "codes",
  "runs",
  "studies",
  "members",
  "invitations",
  "activity",
] as const;
export type GroupSection = (typeof GROUP_SECTIONS)[number];

/** Sections only group admins and site admins may open. */
export const ADMIN_ONLY_SECTIONS: readonly GroupSection[] = ["invitations", "activity"];

/** Where a group opens when nothing more specific was asked for. */
export const DEFAULT_GROUP_SECTION: GroupSection = "runs";

export function isGroupSection(value: string | undefined): value is GroupSection {
  return (GROUP_SECTIONS as readonly string[]).includes(value ?? "");
}

export const paths = {
  home: () => "/",
  signIn: () => "/signin",
  group: (groupId: string, section: GroupSection = DEFAULT_GROUP_SECTION) =>
    `/groups/${encodeURIComponent(groupId)}/${section}`,
  target: (groupId: string, targetId: string) =>
    `/groups/${encodeURIComponent(groupId)}/targets/${encodeURIComponent(targetId)}`,
  run: (groupId: string, runId: string) =>
    `/groups/${encodeURIComponent(groupId)}/runs/${encodeURIComponent(runId)}`,
  invitation: (token: string) => `/invitations/${encodeURIComponent(token)}`,
  apiTokens: () => "/settings/tokens",
  adminGroups: () => "/admin/groups",
  adminPeople: () => "/admin/people",
};
