/**
 * SFTP requests on paths: STAT, LSTAT, SETSTAT, MKDIR, RMDIR, REMOVE, RENAME, REALPATH, READLINK,
 * SYMLINK. Operations that act on a link itself (LSTAT, REMOVE, RENAME, READLINK, MKDIR, RMDIR)
 * resolve the parent folder only; the others follow the final link too.
 */
import { link, lstat, mkdir, readlink, rename, rmdir, stat, unlink } from "node:fs/promises";
import path from "node:path";
import { toAttrs } from "./attrs";
import type { SftpContext } from "./file-ops";
import { pathName, type SftpReply } from "./replies";
import { applyAttrs, type RequestedAttrs } from "./set-attrs";
import { SftpStatusError, STATUS_CODE } from "./status";

const OK: SftpReply = { type: "status", code: STATUS_CODE.OK };

/** link(2) fails with these where the file system has no hard links; OpenSSH then falls back. */
const NO_HARD_LINK_CODES = new Set(["EOPNOTSUPP", "ENOTSUP", "ENOSYS", "EXDEV", "EPERM"]);

function isMissing(error: unknown): boolean {
  const code = (error as NodeJS.ErrnoException).code;
  return code === "ENOENT" || code === "ENOTDIR";
}

async function exists(realPath: string): Promise<boolean> {
  try {
    await lstat(realPath);
    return true;
  } catch (error) {
    if (isMissing(error)) return false;
    throw error;
  }
}

/** Resolves a path that is about to be removed or replaced; the root folder itself never is. */
async function resolveMutable(ctx: SftpContext, clientPath: string): Promise<string> {
  const realPath = await ctx.sandbox.resolve(clientPath, "nofollow");
  if (realPath === ctx.sandbox.realRoot) throw new SftpStatusError(STATUS_CODE.PERMISSION_DENIED);
  return realPath;
}

export async function statPath(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  return { type: "attrs", attrs: toAttrs(await stat(await ctx.sandbox.resolve(clientPath, "follow"))) };
}

export async function lstatPath(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  return { type: "attrs", attrs: toAttrs(await lstat(await ctx.sandbox.resolve(clientPath, "nofollow"))) };
}

export async function setPathAttrs(
  ctx: SftpContext,
  clientPath: string,
  attrs: RequestedAttrs,
): Promise<SftpReply> {
  await applyAttrs({ kind: "path", realPath: await ctx.sandbox.resolve(clientPath, "follow") }, attrs);
  return OK;
}

export async function makeDirectory(
  ctx: SftpContext,
  clientPath: string,
  attrs: RequestedAttrs,
): Promise<SftpReply> {
  const mode = attrs.mode !== undefined ? attrs.mode & 0o7777 : 0o777;
  await mkdir(await ctx.sandbox.resolve(clientPath, "nofollow"), { mode });
  return OK;
}

export async function removeDirectory(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  await rmdir(await resolveMutable(ctx, clientPath));
  return OK;
}

export async function removeFile(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  await unlink(await resolveMutable(ctx, clientPath));
  return OK;
}

/**
 * Plain SFTP v3 RENAME never replaces an existing target on OpenSSH's sftp-server (only the
 * posix-rename@openssh.com extension does, and ssh2's server cannot advertise extensions). For
 * regular files it links the new name and then unlinks the old one, so the refusal is race-free.
 */
export async function renamePath(
  ctx: SftpContext,
  oldClientPath: string,
  newClientPath: string,
): Promise<SftpReply> {
  const oldPath = await resolveMutable(ctx, oldClientPath);
  const newPath = await resolveMutable(ctx, newClientPath);
  const oldStats = await lstat(oldPath);
  const targetExists = new SftpStatusError(STATUS_CODE.FAILURE, "File exists");
  if (oldStats.isFile()) {
    try {
      await link(oldPath, newPath);
    } catch (error) {
      const code = (error as NodeJS.ErrnoException).code ?? "";
      if (code === "EEXIST") throw targetExists;
      if (!NO_HARD_LINK_CODES.has(code)) throw error;
      if (await exists(newPath)) throw targetExists;
      await rename(oldPath, newPath);
      return OK;
    }
    try {
      await unlink(oldPath);
    } catch (error) {
      await unlink(newPath).catch(() => undefined);
      throw error;
    }
    return OK;
  }
  if (await exists(newPath)) throw targetExists;
  await rename(oldPath, newPath);
  return OK;
}

/** "." and "" answer "/", the sandbox root, which is where every SFTP session starts. */
export async function realPathOf(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  const resolved = await ctx.sandbox.resolve(clientPath, "follow");
  return pathName(ctx.sandbox.toVirtual(resolved));
}

/** Absolute targets inside the sandbox are shown as virtual paths; targets outside are refused. */
export async function readLink(ctx: SftpContext, clientPath: string): Promise<SftpReply> {
  const target = await readlink(await ctx.sandbox.resolve(clientPath, "nofollow"));
  const resolved = await ctx.sandbox.resolve(clientPath, "follow");
  return pathName(path.isAbsolute(target) ? ctx.sandbox.toVirtual(resolved) : target);
}

export async function refuseSymlink(): Promise<SftpReply> {
  return { type: "status", code: STATUS_CODE.PERMISSION_DENIED, message: "Symbolic links are not allowed" };
}
