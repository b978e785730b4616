import { z } from "zod";

/** What an audit entry is about; `targetId` is that row's id. */
export const auditTargetTypeSchema = z.enum([
  "group",
  "user",
  "invitation",
  "api_token",
  "host",
  "host_account",
  "code",
  "recipe",
  "allocation",
  "run",
  "target",
]);
export type AuditTargetType = z.infer<typeof auditTargetTypeSchema>;

/**
 * Every action Sigmaflow records in the audit log: the kind of target it is about, and the sentence the
 * activity page shows after the actor's name ("Noor Vasquez confirmed the host key of kestrel-dev").
 * `{target}` is the target's name; any other `{key}` is the entry's `details[key]`. The action strings are
 * stored in `audit_log.action`, so an existing one is never renamed.
 */
export const AUDIT_ACTIONS = {
  "group.create": { target: "group", sentence: "created the group {target}" },
  "member.role_change": { target: "user", sentence: "changed the role of {target} from {from} to {to}" },
  "member.remove": { target: "user", sentence: "removed {target} from the group" },
  "invitation.create": { target: "invitation", sentence: "invited {target} as {role}" },
  "invitation.revoke": { target: "invitation", sentence: "revoked the invitation to {target}" },
  "invitation.accept": { target: "invitation", sentence: "joined the group as {role}" },
  "user.sign_in": { target: "user", sentence: "signed in" },
  "api_token.create": { target: "api_token", sentence: "created the API token {target}" },
  "api_token.revoke": { target: "api_token", sentence: "revoked the API token {target}" },
  "host.create": { target: "host", sentence: "registered the host {target}" },
  "host.update": { target: "host", sentence: "changed the settings of the host {target}" },
  "host.host_key_refresh": { target: "host", sentence: "fetched the host key of {target} again" },
  "host.host_key_confirm": { target: "host", sentence: "confirmed the host key of {target}" },
  "host.key_mismatch": { target: "host", sentence: "found a changed host key on {target} and held its runs" },
  "host.delete": { target: "host", sentence: "deleted the host {target}" },
  "host_account.create": { target: "host_account", sentence: "set up the account {target}" },
  "host_account.disable": { target: "host_account", sentence: "disabled the account {target}" },
  "host_account.enable": { target: "host_account", sentence: "enabled the account {target}" },
  "host_account.replace": { target: "host_account", sentence: "replaced an account with {target}" },
  "host_account.delete": { target: "host_account", sentence: "deleted the account {target}" },
  "code.create": { target: "code", sentence: "registered the code {target}" },
  "code.import": { target: "code", sentence: "imported the codes {target}" },
  "code.delete": { target: "code", sentence: "deleted the code {target}" },
  "code.retire": { target: "code", sentence: "retired the code {target}" },
  "code.restore": { target: "code", sentence: "brought back the code {target}" },
  "code.hosts": { target: "code", sentence: "said the code {target} is installed on {installedOn}" },
  "recipe.create": { target: "recipe", sentence: "created the recipe {target}" },
  "recipe.delete": { target: "recipe", sentence: "deleted the recipe {target}" },
  "target.create": { target: "target", sentence: "entered the target {target}" },
  "target.update": { target: "target", sentence: "saved version {version} of the target {target}" },
  "target.rename": { target: "target", sentence: "renamed the target {from} to {target}" },
  "target.isotopologue_create": {
    target: "target",
    sentence: "created the isotopologue {target} of {parent}",
  },
  "target.delete": { target: "target", sentence: "deleted the target {target}" },
  "allocation.create": { target: "allocation", sentence: "created the allocation {target}" },
  "run.create": { target: "run", sentence: "submitted the run {target}" },
  "run.reuse": { target: "run", sentence: "reused earlier results for the run {target}" },
  "run.cancel": { target: "run", sentence: "asked to cancel the run {target}" },
} as const satisfies Record<string, { target: AuditTargetType; sentence: string }>;

export type AuditAction = keyof typeof AUDIT_ACTIONS;
/** The kind of target an action is recorded against. */
export type AuditTargetOf<A extends AuditAction> = (typeof AUDIT_ACTIONS)[A]["target"];

export const auditActionSchema = z.enum(Object.keys(AUDIT_ACTIONS) as [AuditAction, ...AuditAction[]]);

/** One piece of an activity sentence: plain words, the target's name, or a value from the entry's details. */
export type AuditSentencePart =
  | { kind: "text"; text: string }
  | { kind: "target" }
  | { kind: "detail"; key: string };

/** The sentence of `action` cut at its `{placeholders}`, for a client that renders the target as a link. */
export function auditSentenceParts(action: AuditAction): AuditSentencePart[] {
  return AUDIT_ACTIONS[action].sentence
    .split(/(\{[a-zA-Z]+\})/)
    .filter((piece) => piece !== "")
    .map((piece): AuditSentencePart => {
      const key = /^\{([a-zA-Z]+)\}$/.exec(piece)?.[1];
      if (key === undefined) return { kind: "text", text: piece };
      return key === "target" ? { kind: "target" } : { kind: "detail", key };
    });
}
