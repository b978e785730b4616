/**
 * Run-folder safety on a host. A run folder is `<baseDir>/<runDirName>`, created mode 700 and refused when
 * any component of that path is a symbolic link (a link planted there could send our files, and the
 * job's writes, somewhere else). Inside it only names we generate are used, checked before any remote call.
 *
 * `baseDir` may be absolute or relative to the account's login folder (the folder both exec and SFTP
 * start in). Components above a relative base (the home folder itself) are the host's business and are
 * not checked; an absolute base is checked from "/" down, so configure it by its physical path.
 *
 * The checks use SFTP requests (LSTAT, MKDIR, REALPATH), answered by the connection's long-lived SFTP
 * server: a remote command costs the host a fork and exec of a shell (4–8 ms of CPU measured on loopback),
 * an SFTP request a fraction of a millisecond, and a busy host stages dozens of runs a second. The link
 * check compares REALPATH (every link resolved, realpath(3) in OpenSSH's sftp-server) with the path as
 * written. The only remote command of staging is the one `sha256sum` that verifies every file at once.
 */
import { createHash } from "node:crypto";
import path from "node:path/posix";
import { RemoteFileError, RemotePathError } from "./errors";
import type { RemoteSession } from "./session";

/** A name we generate: letters, digits, "_", ".", "-", not starting with "." or "-" (no hidden files, no options). */
const GENERATED_NAME = /^[A-Za-z0-9_][A-Za-z0-9_.-]{0,254}$/;
const MAX_DEPTH = 16;
/** Files written at once over SFTP: enough to hide round trips, few enough not to hog a shared channel. */
const PARALLEL_WRITES = 8;

export type StagedFile = { relativePath: string; content: Buffer; mode?: number };
export type StagedDigest = { relativePath: string; sha256: string };

/**
 * Pure check of a path inside a run folder: relative, no "." or ".." components, no empty components,
 * every component a generated name. Returns `<runDir>/<relativePath>`.
 */
export function assertInside(runDir: string, relativePath: string): string {
  const refuse = (reason: string): never => {
    throw new RemotePathError(relativePath, reason);
  };
  if (relativePath.includes("\0")) refuse("contains a NUL byte");
  if (relativePath === "") refuse("empty path");
  if (relativePath.startsWith("/")) refuse("absolute paths are not allowed inside a run folder");
  const parts = relativePath.split("/");
  if (parts.length > MAX_DEPTH) refuse(`more than ${MAX_DEPTH} levels deep`);
  for (const part of parts) {
    if (part === "..") refuse("'..' would leave the run folder");
    if (part === "" || part === ".") refuse("empty or '.' path component");
    if (!GENERATED_NAME.test(part)) refuse(`'${part}' is not a name Sigmaflow generates`);
  }
  return `${runDir}/${relativePath}`;
}

/** Normalises a configured base folder; refuses "..", NUL and the root itself. */
export function normaliseBaseDir(baseDir: string): string {
  if (baseDir.includes("\0")) throw new RemotePathError(baseDir, "contains a NUL byte");
  if (baseDir.split("/").includes(".."))
    throw new RemotePathError(baseDir, "'..' is not allowed in a base folder");
  const normalised = path.normalize(baseDir).replace(/\/+$/, "");
  if (normalised === "" || normalised === "." || normalised === "/") {
    throw new RemotePathError(baseDir, "the base folder must be a folder below the root or the login folder");
  }
  return normalised;
}

function joinPath(parent: string, child: string): string {
  return parent === "/" ? `/${child}` : `${parent}/${child}`;
}

/** Every folder from the first component down to `folder` itself, e.g. "a", "a/b" or "/x", "/x/y". */
function folderChain(folder: string): string[] {
  const absolute = folder.startsWith("/");
  const parts = folder.split("/").filter(Boolean);
  return parts.map((_, index) => `${absolute ? "/" : ""}${parts.slice(0, index + 1).join("/")}`);
}

/**
 * Makes sure `folder` is a real folder: created (mode 700) when missing, refused when it is a symbolic
 * link or something else. Returns its owner's uid.
 */
async function ensureFolder(session: RemoteSession, folder: string): Promise<number> {
  let info = await session.lstat(folder);
  if (info === null) {
    await session.mkdir(folder, 0o700);
    info = await session.lstat(folder);
  }
  if (info === null) throw new RemotePathError(folder, "could not be created");
  if (info.isSymbolicLink) throw new RemotePathError(folder, "is a symbolic link");
  if (!info.isDirectory) throw new RemotePathError(folder, "exists and is not a folder");
  return info.uid;
}

/** REALPATH, with a refusal to resolve (a sandbox refusing a link that leaves it) reported as a path problem. */
async function physicalPath(session: RemoteSession, remotePath: string): Promise<string> {
  try {
    return await session.realpath(remotePath);
  } catch (error) {
    if (error instanceof RemoteFileError)
      throw new RemotePathError(remotePath, `cannot be resolved: ${error.message}`);
    throw error;
  }
}

async function assertPhysical(session: RemoteSession, remotePath: string, expected: string): Promise<void> {
  const physical = await physicalPath(session, remotePath);
  if (physical !== expected) {
    throw new RemotePathError(remotePath, `resolves to ${physical}: a component is a symbolic link`);
  }
}

/**
 * Creates `<baseDir>/<runDirName>` (mode 700, no symbolic link on the way) and returns its path as given.
 * A run folder that already exists (a repeated step) must be a real folder with the base folder's owner.
 */
export async function prepareRunDir(
  session: RemoteSession,
  baseDir: string,
  runDirName: string,
): Promise<string> {
  const base = normaliseBaseDir(baseDir);
  if (!GENERATED_NAME.test(runDirName)) {
    throw new RemotePathError(runDirName, "a run folder name must be a name Sigmaflow generates");
  }
  const runDir = `${base}/${runDirName}`;
  const [home, baseInfo] = await Promise.all([
    base.startsWith("/") ? Promise.resolve("") : physicalPath(session, "."),
    session.lstat(base),
  ]);
  const expectedBase = base.startsWith("/") ? base : joinPath(home, base);
  let baseOwner = -1;
  if (baseInfo === null) {
    // The last folder of the chain is the base itself.
    for (const folder of folderChain(base)) baseOwner = await ensureFolder(session, folder);
  } else {
    if (baseInfo.isSymbolicLink) throw new RemotePathError(base, "is a symbolic link");
    if (!baseInfo.isDirectory) throw new RemotePathError(base, "is not a folder");
    baseOwner = baseInfo.uid;
  }
  const [, existing] = await Promise.all([
    assertPhysical(session, base, expectedBase),
    session.lstat(runDir),
  ]);
  if (existing === null) {
    if (!(await session.mkdir(runDir, 0o700))) return prepareRunDir(session, baseDir, runDirName);
  } else {
    if (existing.isSymbolicLink) throw new RemotePathError(runDir, "is a symbolic link");
    if (!existing.isDirectory) throw new RemotePathError(runDir, "exists and is not a folder");
    if (existing.uid !== baseOwner)
      throw new RemotePathError(runDir, "is not owned by the base folder's owner");
    if (existing.mode !== 0o700) await session.chmod(runDir, 0o700);
  }
  await assertPhysical(session, runDir, joinPath(expectedBase, runDirName));
  return runDir;
}

function sha256Hex(content: Buffer): string {
  return createHash("sha256").update(content).digest("hex");
}

/** Subfolders every file needs, each once, parents first. */
function subfoldersOf(runDir: string, relativePaths: string[]): string[] {
  const folders = new Set<string>();
  for (const relativePath of relativePaths) {
    const parts = relativePath.split("/").slice(0, -1);
    for (let depth = 1; depth <= parts.length; depth += 1)
      folders.add(`${runDir}/${parts.slice(0, depth).join("/")}`);
  }
  return [...folders].sort((a, b) => a.split("/").length - b.split("/").length || a.localeCompare(b));
}

/** `sha256sum` lines: "<64 hex>  <name>" (text mode) or "<64 hex> *<name>" (binary mode). */
export function parseSha256sum(output: string): string[] {
  return output
    .split("\n")
    .filter((line) => line.length > 0)
    .map((line) => {
      const match = /^\\?([0-9a-f]{64}) [ *]/.exec(line);
      if (!match) throw new Error(`unexpected sha256sum line: ${line.slice(0, 120)}`);
      return match[1]!;
    });
}

/**
 * Writes the files into the run folder and verifies them on the host with one `sha256sum` over all of
 * them. A planted link at a file name is removed, never followed (exclusive create after unlink).
 */
export async function stageFiles(
  session: RemoteSession,
  runDir: string,
  files: StagedFile[],
): Promise<StagedDigest[]> {
  const remotePaths = files.map((file) => assertInside(runDir, file.relativePath));
  if (new Set(remotePaths).size !== remotePaths.length) {
    throw new RemotePathError(runDir, "the same file is staged twice");
  }
  if (files.length === 0) return [];
  const folders = subfoldersOf(
    runDir,
    files.map((file) => file.relativePath),
  );
  const runDirInfo = await session.lstat(runDir);
  if (runDirInfo === null || runDirInfo.isSymbolicLink || !runDirInfo.isDirectory) {
    throw new RemotePathError(runDir, "is not a prepared run folder (missing, or a symbolic link)");
  }
  // Parents before children, each a real folder: a link anywhere below the run folder refuses the staging.
  for (const folder of folders) await ensureFolder(session, folder);

  let next = 0;
  const writeNext = async () => {
    while (next < files.length) {
      const index = next++;
      const file = files[index]!;
      await session.writeFile(remotePaths[index]!, file.content, {
        mode: file.mode ?? 0o600,
        replaceExclusively: true,
      });
    }
  };
  await Promise.all(Array.from({ length: Math.min(PARALLEL_WRITES, files.length) }, writeNext));

  const digests = parseSha256sum(await session.run(["sha256sum", "--", ...remotePaths]));
  if (digests.length !== files.length) {
    throw new RemoteFileError(
      runDir,
      "mismatch",
      `sha256sum reported ${digests.length} files, ${files.length} were staged`,
    );
  }
  return files.map((file, index) => {
    const local = sha256Hex(file.content);
    if (digests[index] !== local) {
      throw new RemoteFileError(
        remotePaths[index]!,
        "mismatch",
        `sha256 on the host ${digests[index]} differs from the staged ${local}`,
      );
    }
    return { relativePath: file.relativePath, sha256: local };
  });
}
