/**
 * Open files and directories of one SFTP session, keyed by the opaque handle strings the client
 * gets back. Handles are 4-byte counters: never reused within a session, so a stale handle from a
 * closed file cannot reach a newer one.
 */
import type { Dir } from "node:fs";
import type { FileHandle } from "node:fs/promises";

export type FileEntry = { kind: "file"; file: FileHandle; realPath: string };
/** `dotsSent`: "." and ".." (which fs.Dir leaves out) went out in the first batch, as OpenSSH lists them. */
export type DirEntry = { kind: "dir"; dir: Dir; realPath: string; dotsSent: boolean; exhausted: boolean };
export type OpenEntry = FileEntry | DirEntry;

const HANDLE_BYTES = 4;
const MAX_HANDLE = 2 ** 32 - 1;

export class HandleTable {
  private next = 0;
  private readonly entries = new Map<number, OpenEntry>();

  add(entry: OpenEntry): Buffer {
    if (this.next > MAX_HANDLE) throw new Error("handle space exhausted");
    const id = this.next;
    this.next += 1;
    this.entries.set(id, entry);
    const handle = Buffer.alloc(HANDLE_BYTES);
    handle.writeUInt32BE(id, 0);
    return handle;
  }

  get(handle: Buffer): OpenEntry | undefined {
    if (handle.length !== HANDLE_BYTES) return undefined;
    return this.entries.get(handle.readUInt32BE(0));
  }

  /** Removes and returns the entry; the caller closes it. */
  take(handle: Buffer): OpenEntry | undefined {
    const entry = this.get(handle);
    if (entry) this.entries.delete(handle.readUInt32BE(0));
    return entry;
  }

  get size(): number {
    return this.entries.size;
  }

  /** Closes everything still open, e.g. when the channel goes away without CLOSE requests. */
  async closeAll(): Promise<void> {
    const open = [...this.entries.values()];
    this.entries.clear();
    await Promise.allSettled(open.map((entry) => closeEntry(entry)));
  }
}

export async function closeEntry(entry: OpenEntry): Promise<void> {
  if (entry.kind === "file") await entry.file.close();
  else await entry.dir.close();
}
