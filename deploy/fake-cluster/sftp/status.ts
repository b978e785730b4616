/**
 * Maps file system errors to SFTP version 3 status codes (draft-ietf-secsh-filexfer-02 §7), following
 * the choices of OpenSSH's sftp-server (errno_to_portable) where they differ from a plain reading.
 */
import ssh2 from "ssh2";
import { InvalidPathError, OutsideSandboxError } from "./sandbox";

export const { STATUS_CODE, OPEN_MODE } = ssh2.utils.sftp;

export type SftpStatus = { code: number; message: string };

const NO_SUCH_FILE_CODES = new Set(["ENOENT", "ENOTDIR", "EBADF", "ELOOP"]);
const PERMISSION_CODES = new Set(["EACCES", "EPERM", "EFAULT"]);

const DEFAULT_MESSAGES: Record<number, string> = {
  [STATUS_CODE.OK]: "Success",
  [STATUS_CODE.EOF]: "End of file",
  [STATUS_CODE.NO_SUCH_FILE]: "No such file",
  [STATUS_CODE.PERMISSION_DENIED]: "Permission denied",
  [STATUS_CODE.FAILURE]: "Failure",
  [STATUS_CODE.BAD_MESSAGE]: "Bad message",
  [STATUS_CODE.OP_UNSUPPORTED]: "Operation unsupported",
};

/** An answer decided by the server itself rather than by a failed system call. */
export class SftpStatusError extends Error {
  constructor(
    readonly statusCode: number,
    message = DEFAULT_MESSAGES[statusCode] ?? "Failure",
  ) {
    super(message);
  }
}

export function statusMessage(code: number): string {
  return DEFAULT_MESSAGES[code] ?? "Failure";
}

export function statusForError(error: unknown): SftpStatus {
  if (error instanceof SftpStatusError) return { code: error.statusCode, message: error.message };
  if (error instanceof OutsideSandboxError) {
    return { code: STATUS_CODE.PERMISSION_DENIED, message: statusMessage(STATUS_CODE.PERMISSION_DENIED) };
  }
  if (error instanceof InvalidPathError) return { code: STATUS_CODE.BAD_MESSAGE, message: error.message };
  const code = (error as NodeJS.ErrnoException | undefined)?.code ?? "";
  if (NO_SUCH_FILE_CODES.has(code)) {
    return { code: STATUS_CODE.NO_SUCH_FILE, message: statusMessage(STATUS_CODE.NO_SUCH_FILE) };
  }
  if (PERMISSION_CODES.has(code)) {
    return { code: STATUS_CODE.PERMISSION_DENIED, message: statusMessage(STATUS_CODE.PERMISSION_DENIED) };
  }
  if (code === "ENAMETOOLONG" || code === "EINVAL") {
    return { code: STATUS_CODE.BAD_MESSAGE, message: statusMessage(STATUS_CODE.BAD_MESSAGE) };
  }
  if (code === "ENOSYS") {
    return { code: STATUS_CODE.OP_UNSUPPORTED, message: statusMessage(STATUS_CODE.OP_UNSUPPORTED) };
  }
  // A message that names the cause (e.g. "EEXIST: file already exists") helps more than "Failure".
  const message = error instanceof Error ? error.message.replace(/, \w+ '.*'$/, "") : String(error);
  return { code: STATUS_CODE.FAILURE, message: message || "Failure" };
}
