/**
 * Serves one SFTP subsystem channel: dispatches each request to its operation, sends the answer
 * (or the status its error maps to), and cleans up when the client goes away.
 */
import type { SFTPWrapper } from "ssh2";
import { openDirectory, readDirectory } from "./dir-ops";
import { sendExitStatus } from "./exit-status";
import {
  closeHandle,
  openFile,
  readFile,
  type SftpContext,
  setHandleAttrs,
  statHandle,
  writeFile,
} from "./file-ops";
import { closeEntry, HandleTable } from "./handles";
import {
  lstatPath,
  makeDirectory,
  readLink,
  realPathOf,
  refuseSymlink,
  removeDirectory,
  removeFile,
  renamePath,
  setPathAttrs,
  statPath,
} from "./path-ops";
import type { SftpReply } from "./replies";
import { type RequestKind, RequestOrder } from "./request-order";
import type { Sandbox } from "./sandbox";
import type { RequestedAttrs } from "./set-attrs";
import { statusForError, statusMessage } from "./status";

export type SftpLogger = (message: string) => void;

function send(sftp: SFTPWrapper, reqId: number, reply: SftpReply): void {
  switch (reply.type) {
    case "status":
      sftp.status(reqId, reply.code, reply.message ?? statusMessage(reply.code));
      return;
    case "handle":
      sftp.handle(reqId, reply.handle);
      return;
    case "data":
      sftp.data(reqId, reply.data);
      return;
    case "attrs":
      sftp.attrs(reqId, reply.attrs);
      return;
    case "name":
      sftp.name(reqId, reply.names);
      return;
  }
}

export function serveSftp(sftp: SFTPWrapper, sandbox: Sandbox, log: SftpLogger): void {
  const ctx: SftpContext = { sandbox, handles: new HandleTable() };
  let closed = false;

  const order = new RequestOrder();
  const run = (reqId: number, operation: () => Promise<SftpReply>, kind: RequestKind = "barrier") => {
    const execute = async (): Promise<SftpReply | undefined> => {
      // Requests queued behind a closed channel could never be answered; skip their work.
      if (closed) return undefined;
      try {
        return await operation();
      } catch (error) {
        const status = statusForError(error);
        return { type: "status", code: status.code, message: status.message };
      }
    };
    order.schedule(kind, execute, async (reply) => {
      if (!reply) return;
      try {
        if (!closed) return send(sftp, reqId, reply);
        // The channel closed while this OPEN/OPENDIR ran: nobody will ever CLOSE the new handle.
        const orphan = reply.type === "handle" ? ctx.handles.take(reply.handle) : undefined;
        if (orphan) await closeEntry(orphan);
      } catch (error) {
        log(`sftp: could not answer request ${reqId}: ${String(error)}`);
      }
    });
  };
  const attrs = (value: unknown) => value as RequestedAttrs;

  sftp
    .on("OPEN", (reqId, filename, flags, requested) =>
      run(reqId, () => openFile(ctx, filename, flags, attrs(requested))),
    )
    .on("READ", (reqId, handle, offset, length) =>
      run(reqId, () => readFile(ctx, handle, offset, length), "io"),
    )
    .on("WRITE", (reqId, handle, offset, data) =>
      run(reqId, () => writeFile(ctx, handle, offset, data), "io"),
    )
    .on("CLOSE", (reqId, handle) => run(reqId, () => closeHandle(ctx, handle)))
    .on("FSTAT", (reqId, handle) => run(reqId, () => statHandle(ctx, handle)))
    .on("FSETSTAT", (reqId, handle, requested) =>
      run(reqId, () => setHandleAttrs(ctx, handle, attrs(requested))),
    )
    .on("OPENDIR", (reqId, dirPath) => run(reqId, () => openDirectory(ctx, dirPath)))
    .on("READDIR", (reqId, handle) => run(reqId, () => readDirectory(ctx, handle)))
    .on("STAT", (reqId, filePath) => run(reqId, () => statPath(ctx, filePath)))
    .on("LSTAT", (reqId, filePath) => run(reqId, () => lstatPath(ctx, filePath)))
    .on("SETSTAT", (reqId, filePath, requested) =>
      run(reqId, () => setPathAttrs(ctx, filePath, attrs(requested))),
    )
    .on("MKDIR", (reqId, dirPath, requested) =>
      run(reqId, () => makeDirectory(ctx, dirPath, attrs(requested))),
    )
    .on("RMDIR", (reqId, dirPath) => run(reqId, () => removeDirectory(ctx, dirPath)))
    .on("REMOVE", (reqId, filePath) => run(reqId, () => removeFile(ctx, filePath)))
    .on("RENAME", (reqId, oldPath, newPath) => run(reqId, () => renamePath(ctx, oldPath, newPath)))
    .on("REALPATH", (reqId, filePath) => run(reqId, () => realPathOf(ctx, filePath)))
    .on("READLINK", (reqId, filePath) => run(reqId, () => readLink(ctx, filePath)))
    .on("SYMLINK", (reqId) => run(reqId, () => refuseSymlink()));

  // The client's EOF means it is done; without our close in answer OpenSSH's sftp waits forever.
  // Answers still queued go out first, then the exit status sshd reports for a finished
  // sftp-server (scp in SFTP mode exits 1 without it).
  sftp.on("end", () => {
    void order.idle().then(() => {
      sendExitStatus(sftp, 0);
      sftp.end();
    });
  });
  sftp.on("close", () => {
    closed = true;
    void order.idle().then(() => ctx.handles.closeAll());
  });
  sftp.on("error", (error: Error) => log(`sftp: ${error.message}`));
}
