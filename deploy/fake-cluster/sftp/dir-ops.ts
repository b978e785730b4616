/** SFTP directory listing: OPENDIR and READDIR. */
import type { Stats } from "node:fs";
import { lstat, opendir, stat } from "node:fs/promises";
import path from "node:path";
import type { FileEntry } from "ssh2";
import { longName, toAttrs } from "./attrs";
import type { SftpContext } from "./file-ops";
import type { DirEntry } from "./handles";
import type { SftpReply } from "./replies";
import { SftpStatusError, STATUS_CODE } from "./status";

/** Entries per NAME answer; OpenSSH's sftp-server sends at most 100 as well. */
const ENTRIES_PER_REPLY = 100;

function nameEntry(filename: string, stats: Stats): FileEntry {
  return { filename, longname: longName(filename, stats), attrs: toAttrs(stats) };
}

export async function openDirectory(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  const realPath = await ctx.sandbox.resolve(clientPath, "follow");
  const dir = await opendir(realPath);
  const entry: DirEntry = { kind: "dir", dir, realPath, dotsSent: false, exhausted: false };
  return { type: "handle", handle: ctx.handles.add(entry) };
}

export async function readDirectory(ctx: SftpContext, handle: Buffer): Promise<SftpReply> {
  const entry = ctx.handles.get(handle);
  if (entry?.kind !== "dir") throw new SftpStatusError(STATUS_CODE.FAILURE, "Invalid handle");
  const names: FileEntry[] = [];
  if (!entry.dotsSent) {
    entry.dotsSent = true;
    const own = await stat(entry.realPath);
    // ".." of the sandbox root is the root itself, as in a chroot; the real parent stays hidden.
    const parent = entry.realPath === ctx.sandbox.realRoot ? own : await stat(path.dirname(entry.realPath));
    names.push(nameEntry(".", own), nameEntry("..", parent));
  }
  while (!entry.exhausted && names.length < ENTRIES_PER_REPLY) {
    const dirent = await entry.dir.read();
    if (dirent === null) {
      entry.exhausted = true;
      break;
    }
    try {
      names.push(nameEntry(dirent.name, await lstat(path.join(entry.realPath, dirent.name))));
    } catch (error) {
      // Removed between the listing and the lstat: leave it out, as if listed a moment later.
      if ((error as NodeJS.ErrnoException).code !== "ENOENT") throw error;
    }
  }
  // End of listing is an EOF status, never an empty NAME answer.
  if (names.length === 0) return { type: "status", code: STATUS_CODE.EOF };
  return { type: "name", names };
}
