/**
 * Confines SFTP paths to the fake cluster's root folder. Client paths are virtual absolute paths
 * rooted at "/" (the root folder), the way a chrooted SFTP server shows them: ".." at "/" stays at
 * "/". Beyond that lexical mapping, symbolic links are resolved component by component so that a
 * link planted inside the root (by a job, or by hand) cannot carry an SFTP operation outside it.
 *
 * The check and the operation are separate system calls, so a link swapped in between them by a
 * concurrent process is not caught; the fake cluster also runs arbitrary commands over exec, so
 * the sandbox keeps honest clients inside the root rather than defending against hostile ones.
 */
import { lstat, readlink, realpath } from "node:fs/promises";
import path from "node:path";

/** Linux follows at most 40 links per lookup (MAXSYMLINKS); beyond that the lookup fails with ELOOP. */
const MAX_LINK_HOPS = 40;

/** Raised when a path would leave the root; answered with SFTP PERMISSION_DENIED. */
export class OutsideSandboxError extends Error {
  readonly code = "EOUTSIDE";
  constructor(clientPath: string) {
    super(`${clientPath}: outside the sandbox`);
  }
}

/** Raised for a path the protocol cannot carry to the file system (embedded NUL). */
export class InvalidPathError extends Error {
  readonly code = "EBADPATH";
  constructor() {
    super("invalid path");
  }
}

function errnoError(code: string, message: string): NodeJS.ErrnoException {
  return Object.assign(new Error(message), { code });
}

function isMissing(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException).code;
  return code === "ENOENT" || code === "ENOTDIR";
}

/** Whether the final component of a path is itself resolved when it is a symbolic link. */
export type LinkMode = "follow" | "nofollow";

export class Sandbox {
  private constructor(readonly realRoot: string) {}

  /** The root must exist; its own real path (e.g. /tmp behind a link) becomes the boundary. */
  static async open(rootDir: string): Promise<Sandbox> {
    return new Sandbox(await realpath(rootDir));
  }

  /** Normalises a client path to the virtual absolute form the client sees ("." → "/"). */
  virtualPath(clientPath: string): string {
    if (clientPath.includes("\0")) throw new InvalidPathError();
    return path.posix.resolve("/", clientPath);
  }

  contains(realPath: string): boolean {
    return realPath === this.realRoot || realPath.startsWith(this.realRoot + path.sep);
  }

  /** The virtual path of a real path inside the root. */
  toVirtual(realPath: string): string {
    const relative = path.relative(this.realRoot, realPath);
    return relative === "" ? "/" : `/${relative.split(path.sep).join("/")}`;
  }

  /** Lexical mapping only: where the client path lands before any link is looked at. */
  lexicalPath(clientPath: string): string {
    const mapped = path.resolve(this.realRoot, `.${this.virtualPath(clientPath)}`);
    if (!this.contains(mapped)) throw new OutsideSandboxError(clientPath);
    return mapped;
  }

  /**
   * The real path an operation on `clientPath` touches, with every symbolic link along the way
   * resolved (the final one only in "follow" mode). Components that do not exist yet are kept as
   * written, so a path to be created resolves too. Throws OutsideSandboxError if the result leaves
   * the root; file system errors other than a missing component propagate.
   */
  async resolve(clientPath: string, mode: LinkMode): Promise<string> {
    const lexical = this.lexicalPath(clientPath);
    const pending = path.relative(this.realRoot, lexical).split(path.sep).filter(Boolean);
    let current = this.realRoot;
    let hops = 0;
    while (pending.length > 0) {
      const name = pending.shift()!;
      if (name === ".") continue;
      if (name === "..") {
        current = path.dirname(current);
        continue;
      }
      const next = path.join(current, name);
      if (pending.length === 0 && mode === "nofollow") {
        current = next;
        break;
      }
      let isLink: boolean;
      try {
        isLink = (await lstat(next)).isSymbolicLink();
      } catch (error) {
        if (!isMissing(error)) throw error;
        current = path.join(next, ...pending);
        break;
      }
      if (!isLink) {
        current = next;
        continue;
      }
      hops += 1;
      if (hops > MAX_LINK_HOPS) throw errnoError("ELOOP", `${clientPath}: too many levels of symbolic links`);
      const target = await readlink(next);
      if (path.isAbsolute(target)) current = path.parse(target).root;
      pending.unshift(...target.split("/").filter(Boolean));
    }
    if (!this.contains(current)) throw new OutsideSandboxError(clientPath);
    return current;
  }
}
