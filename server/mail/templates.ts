import { escapeHtml } from "../../shared/html";
import type { GroupRole } from "../../shared/schemas/groups";
import type { OutgoingMail } from "./mailer";

const ROLE_WORDS: Record<GroupRole, string> = {
  collaborator: "a collaborator (read-only access to results)",
  member: "a researcher (submit and manage runs)",
  admin: "an admin (manage members, hosts and allocations)",
};

export function invitationMail(input: {
  to: string;
  groupName: string;
  inviterName: string;
  role: GroupRole;
  link: string;
  expiresAt: Date;
}): OutgoingMail {
  const expires = input.expiresAt.toISOString().slice(0, 10);
  const text = [
    `${input.inviterName} invited you to join ${input.groupName} on Sigmaflow as ${ROLE_WORDS[input.role]}.`,
    "",
    `Accept the invitation: ${input.link}`,
    "",
    `The link works until ${expires} and only for ${input.to}. If you did not expect it, ignore this message.`,
  ].join("\n");
  const html = `<p>${escapeHtml(input.inviterName)} invited you to join <strong>${escapeHtml(input.groupName)}</strong>
on Sigmaflow as ${escapeHtml(ROLE_WORDS[input.role])}.</p>
<p><a href="${escapeHtml(input.link)}">Accept the invitation</a></p>
<p>The link works until ${expires} and only for ${escapeHtml(input.to)}. If you did not expect it, ignore this message.</p>`;
  return { to: input.to, subject: `Invitation to ${input.groupName} on Sigmaflow`, text, html };
}
