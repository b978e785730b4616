/** What an SFTP request handler answers; sent by the dispatcher in handlers.ts. */
import type { Attributes, FileEntry } from "ssh2";

export type SftpReply =
  | { type: "status"; code: number; message?: string }
  | { type: "handle"; handle: Buffer }
  | { type: "data"; data: Buffer }
  | { type: "attrs"; attrs: Attributes }
  | { type: "name"; names: FileEntry[] };

/** A NAME answer for requests that return a path only (REALPATH, READLINK): no attributes. */
export function pathName(name: string): SftpReply {
  return { type: "name", names: [{ filename: name, longname: name, attrs: {} as Attributes }] };
}
