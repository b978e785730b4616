/** SFTP requests on open files: OPEN, READ, WRITE, CLOSE, FSTAT, FSETSTAT. */
import { constants as fsConstants } from "node:fs";
import { open, stat } from "node:fs/promises";
import { toAttrs } from "./attrs";
import { closeEntry, type FileEntry, type HandleTable, type OpenEntry } from "./handles";
import type { SftpReply } from "./replies";
import type { Sandbox } from "./sandbox";
import { applyAttrs, type RequestedAttrs } from "./set-attrs";
import { OPEN_MODE, SftpStatusError, STATUS_CODE } from "./status";

export type SftpContext = { sandbox: Sandbox; handles: HandleTable };

/**
 * Largest READ answered in one DATA packet: OpenSSH's sftp-server caps reads at its 256 KiB message
 * limit minus 1 KiB of framing (SFTP_MAX_READ_LENGTH in sftp.h, from memory); clients ask
 * for 32 KiB by default, so the cap only matters for unusual clients.
 */
export const MAX_READ_BYTES = 256 * 1024 - 1024;

const OK: SftpReply = { type: "status", code: STATUS_CODE.OK };

/** SFTP pflags → open(2) flags, as OpenSSH's flags_from_portable maps them. */
export function openFlags(pflags: number): number {
  const { O_RDONLY, O_WRONLY, O_RDWR, O_APPEND, O_CREAT, O_TRUNC, O_EXCL, O_NOFOLLOW } = fsConstants;
  const read = (pflags & OPEN_MODE.READ) !== 0;
  const write = (pflags & OPEN_MODE.WRITE) !== 0;
  let flags = read && write ? O_RDWR : write ? O_WRONLY : O_RDONLY;
  if (pflags & OPEN_MODE.APPEND) flags |= O_APPEND;
  if (pflags & OPEN_MODE.CREAT) flags |= O_CREAT;
  if (pflags & OPEN_MODE.TRUNC) flags |= O_TRUNC;
  if (pflags & OPEN_MODE.EXCL) flags |= O_EXCL;
  // The path was resolved through every link already; a link appearing at the last component
  // since then makes open fail (ELOOP) instead of following it out of the sandbox.
  return flags | O_NOFOLLOW;
}

function fileEntry(ctx: SftpContext, handle: Buffer): FileEntry {
  const entry = ctx.handles.get(handle);
  if (entry?.kind !== "file") throw new SftpStatusError(STATUS_CODE.FAILURE, "Invalid handle");
  return entry;
}

function anyEntry(ctx: SftpContext, handle: Buffer): OpenEntry {
  const entry = ctx.handles.get(handle);
  if (!entry) throw new SftpStatusError(STATUS_CODE.FAILURE, "Invalid handle");
  return entry;
}

export async function openFile(
  ctx: SftpContext,
  clientPath: string,
  pflags: number,
  attrs: RequestedAttrs,
): Promise<SftpReply> {
  const realPath = await ctx.sandbox.resolve(clientPath, "follow");
  const mode = attrs.mode !== undefined ? attrs.mode & 0o7777 : 0o666;
  const file = await open(realPath, openFlags(pflags), mode);
  return { type: "handle", handle: ctx.handles.add({ kind: "file", file, realPath }) };
}

export async function readFile(
  ctx: SftpContext,
  handle: Buffer,
  offset: number,
  length: number,
): Promise<SftpReply> {
  const { file } = fileEntry(ctx, handle);
  const buffer = Buffer.allocUnsafe(Math.min(length, MAX_READ_BYTES));
  const { bytesRead } = await file.read(buffer, 0, buffer.length, offset);
  // An empty DATA packet at end of file sends OpenSSH's sftp client into an endless read loop.
  if (bytesRead === 0) return { type: "status", code: STATUS_CODE.EOF };
  return { type: "data", data: buffer.subarray(0, bytesRead) };
}

export async function writeFile(
  ctx: SftpContext,
  handle: Buffer,
  offset: number,
  data: Buffer,
): Promise<SftpReply> {
  const { file } = fileEntry(ctx, handle);
  let written = 0;
  while (written < data.length) {
    const { bytesWritten } = await file.write(data, written, data.length - written, offset + written);
    written += bytesWritten;
  }
  return OK;
}

export async function closeHandle(ctx: SftpContext, handle: Buffer): Promise<SftpReply> {
  const entry = ctx.handles.take(handle);
  if (!entry) throw new SftpStatusError(STATUS_CODE.FAILURE, "Invalid handle");
  await closeEntry(entry);
  return OK;
}

export async function statHandle(ctx: SftpContext, handle: Buffer): Promise<SftpReply> {
  const entry = anyEntry(ctx, handle);
  const stats = entry.kind === "file" ? await entry.file.stat() : await stat(entry.realPath);
  return { type: "attrs", attrs: toAttrs(stats) };
}

export async function setHandleAttrs(
  ctx: SftpContext,
  handle: Buffer,
  attrs: RequestedAttrs,
): Promise<SftpReply> {
  const entry = anyEntry(ctx, handle);
  await applyAttrs(
    entry.kind === "file" ? { kind: "handle", file: entry.file } : { kind: "path", realPath: entry.realPath },
    attrs,
  );
  return OK;
}
