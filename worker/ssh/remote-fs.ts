/**
 * Run-folder safety on a host. A run folder is `<baseDir>/<runDirName>`, created mode 700 and refused when
 * any component of that path is a symbolic link (a link planted there could send our files, and the
 * job's writes, somewhere else). Inside it only names we generate are used, checked before any remote call.
 *
 * `baseDir` may be absolute or relative to the account's login folder (the folder both exec and SFTP
 * start in). Components above a relative base (the home folder itself) are the host's business and are
 * not checked; an absolute base is checked from "/" down, so configure it by its physical path.
 *
 * Round trips are kept few (the stage step runs per run, and a busy host stages dozens a second): one exec
 * to prepare the folder, one exec for subfolders only when there are any, parallel SFTP writes, and one
 * `sha256sum` exec that verifies every file at once.
 */
import { createHash } from "node:crypto";
import path from "node:path/posix";
import { RemoteCommandError, RemoteFileError, RemotePathError } from "./errors";
import { commandLine, shellScript } from "./quote";
import type { RemoteSession } from "./session";

/** A name we generate: letters, digits, "_", ".", "-", not starting with "." or "-" (no hidden files, no options). */
const GENERATED_NAME = /^[A-Za-z0-9_][A-Za-z0-9_.-]{0,254}$/;
const MAX_DEPTH = 16;
/** Exit status our scripts use for "refused: a path problem" (anything else non-zero is a command failure). */
const PATH_REFUSED = 3;
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
  if (baseDir.split("/").includes("..")) throw new RemotePathError(baseDir, "'..' is not allowed in a base folder");
  const normalised = path.normalize(baseDir).replace(/\/+$/, "");
  if (normalised === "" || normalised === "." || normalised === "/") {
    throw new RemotePathError(baseDir, "the base folder must be a folder below the root or the login folder");
  }
  return normalised;
}

/*
 * $1 = base folder, $2 = run folder name. Prints nothing on success. Physical-path comparison (`cd -P`)
 * catches a link anywhere in the checked part; `[ -L ]` catches the run folder itself before mkdir.
 */
const PREPARE_SCRIPT = `
set -u
base=$1; run=$2
umask 077
refuse() { printf '%s\\n' "$1" >&2; exit ${PATH_REFUSED}; }
if [ ! -e "$base" ] && [ ! -L "$base" ]; then mkdir -p -- "$base" || exit 4; fi
[ -d "$base" ] || refuse "$base is not a folder"
case $base in /*) want=$base ;; *) want=$(pwd -P)/$base ;; esac
got=$(cd -P -- "$base" && pwd -P) || exit 4
[ "$got" = "$want" ] || refuse "$base resolves to $got: a component is a symbolic link"
dir=$base/$run
[ -L "$dir" ] && refuse "$dir is a symbolic link"
if [ -e "$dir" ]; then
  [ -d "$dir" ] || refuse "$dir exists and is not a folder"
else
  mkdir -m 700 -- "$dir" || exit 4
fi
[ -O "$dir" ] || refuse "$dir is not owned by $(id -un)"
chmod 700 -- "$dir" || exit 4
got=$(cd -P -- "$dir" && pwd -P) || exit 4
[ "$got" = "$want/$run" ] || refuse "$dir resolves to $got: a component is a symbolic link"
`;

/*
 * $1 = run folder, then the subfolders to create, parents before children. Each existing component must
 * be a real folder; a link anywhere refuses the whole staging.
 */
const SUBFOLDERS_SCRIPT = `
set -u
umask 077
refuse() { printf '%s\\n' "$1" >&2; exit ${PATH_REFUSED}; }
[ -L "$1" ] && refuse "$1 is a symbolic link"
[ -d "$1" ] || refuse "$1 is not a folder"
shift
for dir in "$@"; do
  [ -L "$dir" ] && refuse "$dir is a symbolic link"
  if [ -e "$dir" ]; then [ -d "$dir" ] || refuse "$dir exists and is not a folder"
  else mkdir -m 700 -- "$dir" || exit 4
  fi
done
`;

async function runChecked(session: RemoteSession, argv: string[], pathForErrors: string): Promise<string> {
  const result = await session.exec(argv);
  const stderr = result.stderr.toString("utf8").trim();
  if (result.code === PATH_REFUSED) throw new RemotePathError(pathForErrors, stderr || "refused by the host");
  if (result.code !== 0) throw new RemoteCommandError(commandLine(argv.slice(0, 2)), result.code, result.stderr);
  return result.stdout.toString("utf8");
}

/** Creates `<baseDir>/<runDirName>` (mode 700, ours, no symbolic link on the way) and returns its path. */
export async function prepareRunDir(session: RemoteSession, baseDir: string, runDirName: string): Promise<string> {
  const base = normaliseBaseDir(baseDir);
  if (!GENERATED_NAME.test(runDirName)) {
    throw new RemotePathError(runDirName, "a run folder name must be a name Sigmaflow generates");
  }
  const runDir = `${base}/${runDirName}`;
  await runChecked(session, shellScript(PREPARE_SCRIPT, [base, runDirName]), runDir);
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
    for (let depth = 1; depth <= parts.length; depth += 1) folders.add(`${runDir}/${parts.slice(0, depth).join("/")}`);
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
export async function stageFiles(session: RemoteSession, runDir: string, files: StagedFile[]): Promise<StagedDigest[]> {
  const remotePaths = files.map((file) => assertInside(runDir, file.relativePath));
  if (new Set(remotePaths).size !== remotePaths.length) {
    throw new RemotePathError(runDir, "the same file is staged twice");
  }
  if (files.length === 0) return [];
  const folders = subfoldersOf(
    runDir,
    files.map((file) => file.relativePath),
  );
  if (folders.length > 0) await runChecked(session, shellScript(SUBFOLDERS_SCRIPT, [runDir, ...folders]), runDir);

  let next = 0;
  const writeNext = async () => {
    while (next < files.length) {
      const index = next++;
      const file = files[index]!;
      await session.writeFile(remotePaths[index]!, file.content, { mode: file.mode ?? 0o600, replaceExclusively: true });
    }
  };
  await Promise.all(Array.from({ length: Math.min(PARALLEL_WRITES, files.length) }, writeNext));

  const digests = parseSha256sum(await session.run(["sha256sum", "--", ...remotePaths]));
  if (digests.length !== files.length) {
    throw new RemoteFileError(runDir, "mismatch", `sha256sum reported ${digests.length} files, ${files.length} were staged`);
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
