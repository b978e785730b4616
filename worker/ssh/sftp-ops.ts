/**
 * Promise wrappers over one ssh2 SFTP channel, with SFTP status codes mapped onto RemoteFileError and a
 * lost channel onto TransportError. Writes are pipelined (several WRITE requests in flight) because ssh2
 * sends the pieces of one oversized write one after another, a round trip each.
 */
import type { SFTPWrapper, Stats, TransferOptions } from "ssh2";
import { classifySshError, RemoteFileError, type SshError } from "./errors";

/** SFTP status codes (draft-ietf-secsh-filexfer-02 §7, the version OpenSSH speaks). */
const SFTP_NO_SUCH_FILE = 2;
const SFTP_PERMISSION_DENIED = 3;

/** Bytes per WRITE/READ request: below every server's limit (OpenSSH allows 256 KiB, RFC minimum 32 KiB). */
const IO_CHUNK_BYTES = 32 * 1024;
/** Requests kept in flight per file, enough to cover the loopback/LAN bandwidth-delay product. */
const IO_REQUESTS_IN_FLIGHT = 16;

export type RemoteStat = {
  sizeBytes: number;
  mode: number;
  uid: number;
  isFile: boolean;
  isDirectory: boolean;
  isSymbolicLink: boolean;
  modifiedAt: Date;
};

export type WriteOptions = {
  /** Permission bits for a file this call creates. */
  mode?: number;
  /**
   * Remove whatever is at the path first (a file or a symbolic link, never its target) and create the file
   * exclusively (O_CREAT|O_EXCL, which refuses to follow a link): a link planted at the name cannot
   * redirect the write.
   */
  replaceExclusively?: boolean;
};

export function sftpError(error: unknown, remotePath: string): SshError {
  const code = (error as { code?: unknown } | null)?.code;
  const message = error instanceof Error ? error.message : String(error);
  if (code === SFTP_NO_SUCH_FILE)
    return new RemoteFileError(remotePath, "missing", "no such file", { cause: error });
  if (code === SFTP_PERMISSION_DENIED) {
    return new RemoteFileError(remotePath, "permission", "permission denied", { cause: error });
  }
  if (typeof code === "number") return new RemoteFileError(remotePath, "failure", message, { cause: error });
  return classifySshError(error);
}

function call<T>(
  remotePath: string,
  start: (done: (error: Error | undefined | null, value?: T) => void) => void,
) {
  return new Promise<T>((resolve, reject) => {
    try {
      start((error, value) => (error ? reject(sftpError(error, remotePath)) : resolve(value as T)));
    } catch (error) {
      reject(sftpError(error, remotePath));
    }
  });
}

function toRemoteStat(stats: Stats): RemoteStat {
  return {
    sizeBytes: stats.size,
    mode: stats.mode & 0o7777,
    uid: stats.uid,
    isFile: stats.isFile(),
    isDirectory: stats.isDirectory(),
    isSymbolicLink: stats.isSymbolicLink(),
    modifiedAt: new Date(stats.mtime * 1000),
  };
}

/** Stat following links; null when nothing is there. */
export async function statPath(
  sftp: SFTPWrapper,
  remotePath: string,
  follow = true,
): Promise<RemoteStat | null> {
  try {
    const stats = await call<Stats>(remotePath, (done) =>
      follow ? sftp.stat(remotePath, done) : sftp.lstat(remotePath, done),
    );
    return toRemoteStat(stats);
  } catch (error) {
    if (error instanceof RemoteFileError && error.reason === "missing") return null;
    throw error;
  }
}

async function closeHandle(sftp: SFTPWrapper, remotePath: string, handle: Buffer): Promise<void> {
  await call<void>(remotePath, (done) => sftp.close(handle, done));
}

/**
 * Exclusive create first (the usual case: a fresh run folder, one round trip); only if something is
 * already there, unlink it (a link itself, never its target) and create exclusively again. SFTP v3 has no
 * "already exists" status: OpenSSH answers EEXIST with a generic FAILURE.
 */
async function openReplacingExclusively(
  sftp: SFTPWrapper,
  remotePath: string,
  mode: number,
): Promise<Buffer> {
  const create = () => call<Buffer>(remotePath, (done) => sftp.open(remotePath, "wx", { mode }, done));
  let refusal: unknown;
  try {
    return await create();
  } catch (error) {
    // "permission" too: a sandboxing server may refuse to open through a link that points outside it.
    const replaceable =
      error instanceof RemoteFileError && (error.reason === "failure" || error.reason === "permission");
    if (!replaceable) throw error;
    refusal = error;
  }
  try {
    await call<void>(remotePath, (done) => sftp.unlink(remotePath, done));
  } catch (error) {
    throw error instanceof RemoteFileError && error.reason === "missing" ? refusal : error;
  }
  return create();
}

export async function writeWhole(
  sftp: SFTPWrapper,
  remotePath: string,
  content: Buffer,
  options: WriteOptions = {},
): Promise<void> {
  const handle = options.replaceExclusively
    ? await openReplacingExclusively(sftp, remotePath, options.mode ?? 0o600)
    : await call<Buffer>(remotePath, (done) =>
        sftp.open(remotePath, "w", { mode: options.mode ?? 0o600 }, done),
      );
  let failure: unknown = null;
  try {
    let nextOffset = 0;
    const writeNext = async (): Promise<void> => {
      while (nextOffset < content.length) {
        const offset = nextOffset;
        const length = Math.min(IO_CHUNK_BYTES, content.length - offset);
        nextOffset += length;
        await call<void>(remotePath, (done) => sftp.write(handle, content, offset, length, offset, done));
      }
    };
    const lanes = Math.min(IO_REQUESTS_IN_FLIGHT, Math.max(1, Math.ceil(content.length / IO_CHUNK_BYTES)));
    await Promise.all(Array.from({ length: lanes }, writeNext));
  } catch (error) {
    failure = error;
  }
  try {
    await closeHandle(sftp, remotePath, handle);
  } catch (error) {
    failure ??= error;
  }
  if (failure) throw failure;
}

/**
 * Reads `handle` from byte `start` in chunks until end of file or `maxBytes` bytes; `tooLarge` (when
 * given) is thrown as soon as more than `maxBytes` would be needed, so at most one chunk beyond the limit
 * is ever held. The handle is closed whatever happens; the first failure wins.
 */
async function readFromHandle(
  sftp: SFTPWrapper,
  remotePath: string,
  handle: Buffer,
  start: number,
  maxBytes: number,
  tooLarge?: () => Error,
): Promise<Buffer> {
  const chunks: Buffer[] = [];
  let failure: unknown = null;
  try {
    let position = start;
    let read = 0;
    while (tooLarge || read < maxBytes) {
      const size = tooLarge ? IO_CHUNK_BYTES * 4 : Math.min(maxBytes - read, IO_CHUNK_BYTES * 4);
      const buffer = Buffer.allocUnsafe(size);
      const bytesRead = await call<number>(remotePath, (done) =>
        sftp.read(handle, buffer, 0, buffer.length, position, (error, count) => done(error, count)),
      );
      if (bytesRead === 0) break;
      position += bytesRead;
      read += bytesRead;
      if (tooLarge && read > maxBytes) throw tooLarge();
      chunks.push(buffer.subarray(0, bytesRead));
    }
  } catch (error) {
    failure = error;
  }
  try {
    await closeHandle(sftp, remotePath, handle);
  } catch (error) {
    failure ??= error;
  }
  if (failure) throw failure;
  return Buffer.concat(chunks);
}

/**
 * Reads a whole file, refusing one larger than maxBytes (checked as the bytes arrive), so a runaway
 * output file cannot exhaust the worker's memory.
 */
export async function readWhole(sftp: SFTPWrapper, remotePath: string, maxBytes: number): Promise<Buffer> {
  const handle = await call<Buffer>(remotePath, (done) => sftp.open(remotePath, "r", done));
  return readFromHandle(
    sftp,
    remotePath,
    handle,
    0,
    maxBytes,
    () => new RemoteFileError(remotePath, "too-large", `larger than the ${maxBytes}-byte limit`),
  );
}

/**
 * Reads at most `maxBytes` starting at byte `offsetBytes` (fewer at the end of the file); null when the
 * file does not exist. How a growing log is followed without a remote command.
 */
export async function readRange(
  sftp: SFTPWrapper,
  remotePath: string,
  offsetBytes: number,
  maxBytes: number,
): Promise<Buffer | null> {
  let handle: Buffer;
  try {
    handle = await call<Buffer>(remotePath, (done) => sftp.open(remotePath, "r", done));
  } catch (error) {
    if (error instanceof RemoteFileError && error.reason === "missing") return null;
    throw error;
  }
  return readFromHandle(sftp, remotePath, handle, offsetBytes, maxBytes);
}

export function fastPut(
  sftp: SFTPWrapper,
  localPath: string,
  remotePath: string,
  options: TransferOptions,
): Promise<void> {
  return call<void>(remotePath, (done) => sftp.fastPut(localPath, remotePath, options, done));
}

/** Creates one folder; false when something already exists there (SFTP v3 answers that with FAILURE). */
export async function mkdirPath(sftp: SFTPWrapper, remotePath: string, mode: number): Promise<boolean> {
  try {
    await call<void>(remotePath, (done) => sftp.mkdir(remotePath, { mode }, done));
    return true;
  } catch (error) {
    if (!(error instanceof RemoteFileError && error.reason === "failure")) throw error;
    if ((await statPath(sftp, remotePath, false)) === null) throw error;
    return false;
  }
}

export function chmodPath(sftp: SFTPWrapper, remotePath: string, mode: number): Promise<void> {
  return call<void>(remotePath, (done) => sftp.chmod(remotePath, mode, done));
}

/** The server's canonical absolute path, every symbolic link resolved (OpenSSH: realpath(3)). */
export function realPath(sftp: SFTPWrapper, remotePath: string): Promise<string> {
  return call<string>(remotePath, (done) => sftp.realpath(remotePath, done));
}
