/**
 * SETSTAT / FSETSTAT: applies the attributes the client sent, in the order OpenSSH's sftp-server
 * does (size, permissions, times, owner), stopping at the first failure.
 */
import { chmod, chown, type FileHandle, truncate, utimes } from "node:fs/promises";
import type { Attributes } from "ssh2";

/** Attributes as parsed from a request: only the fields the client flagged are present. */
export type RequestedAttrs = Partial<Attributes>;

type Target = { kind: "path"; realPath: string } | { kind: "handle"; file: FileHandle };

export async function applyAttrs(target: Target, attrs: RequestedAttrs): Promise<void> {
  if (attrs.size !== undefined) {
    if (target.kind === "handle") await target.file.truncate(attrs.size);
    else await truncate(target.realPath, attrs.size);
  }
  if (attrs.mode !== undefined) {
    const mode = attrs.mode & 0o7777;
    if (target.kind === "handle") await target.file.chmod(mode);
    else await chmod(target.realPath, mode);
  }
  if (attrs.atime !== undefined && attrs.mtime !== undefined) {
    if (target.kind === "handle") await target.file.utimes(attrs.atime, attrs.mtime);
    else await utimes(target.realPath, attrs.atime, attrs.mtime);
  }
  if (attrs.uid !== undefined && attrs.gid !== undefined) {
    if (target.kind === "handle") await target.file.chown(attrs.uid, attrs.gid);
    else await chown(target.realPath, attrs.uid, attrs.gid);
  }
}
