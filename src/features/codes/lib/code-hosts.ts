import type { Host } from "@shared/schemas";

/** What the codes table says of a version that is not pinned to any host. */
export const ANY_HOST = "Any host";

/**
 * Where a code version is installed, in words: "Any host" when it is not pinned, else the hosts' names
 * in the group's order. A pinned host the list does not hold (yet) is counted rather than named.
 */
export function installedOnText(hostIds: readonly string[] | undefined, hosts: readonly Host[] | undefined) {
  const pinned = hostIds ?? [];
  if (pinned.length === 0) return ANY_HOST;
  if (!hosts) return pinned.length === 1 ? "1 host" : `${pinned.length} hosts`;
  const wanted = new Set(pinned);
  const named = hosts.filter((host) => wanted.has(host.id)).map((host) => host.name);
  const unknown = pinned.length - named.length;
  if (unknown > 0) named.push(unknown === 1 ? "1 unknown host" : `${unknown} unknown hosts`);
  return named.join(", ");
}

/** The ticked hosts as the list the API takes: the group's hosts that are ticked, in the group's order. */
export function hostIdsToSave(ticked: ReadonlySet<string>, hosts: readonly Host[]): string[] {
  return hosts.filter((host) => ticked.has(host.id)).map((host) => host.id);
}
