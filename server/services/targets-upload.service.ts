/**
 * Rules for entering a target from an uploaded XYZ file (multipart/form-data): who may upload to a group,
 * checked before the file is read, and the file's bytes as text. The text then goes through the same XYZ
 * reading as pasted text (target-geometry.ts), so every problem is a 422 naming the line at fault.
 */
import type { Principal } from "../auth/principal";
import type { Database } from "../db/client";
import { AppError } from "../http/errors";
import { requireGroupRole } from "./access";

/** Members and admins enter targets (collaborators read them); a group one is not in is a 404. */
export async function requireTargetUploadAccess(
  db: Database,
  principal: Principal,
  groupId: string,
): Promise<void> {
  await requireGroupRole(db, principal, groupId, "member");
}

/**
 * The uploaded file as UTF-8 text, or a 422 naming the first line that is not UTF-8 (a binary file).
 * Control characters in otherwise valid UTF-8 are left to the XYZ reader, which names their line too.
 */
export function xyzTextFromUpload(bytes: Uint8Array, fileName: string): string {
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    const lossy = new TextDecoder("utf-8").decode(bytes);
    const line = lossy.slice(0, lossy.indexOf("\uFFFD")).split("\n").length;
    throw new AppError(
      422,
      "invalid_xyz",
      `The XYZ text cannot be used: Line ${line} of ${fileName} is not UTF-8 text; is this a binary file? Upload the XYZ file as text.`,
      { path: "file", line },
    );
  }
}
