import { closeSync, existsSync, fstatSync, mkdirSync, openSync, readdirSync, readSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import type { ByteSource } from './ByteSource.ts';

/**
 * Reading and writing files for the command line and the Node library, with
 * errors in words that name the file, the cause and what to do. Node only.
 */

/** What a file-system error code means, in words. */
export function fileErrorWords(e: unknown): string {
  const code = (e as NodeJS.ErrnoException)?.code;
  switch (code) {
    case 'ENOSPC': return 'the disk is full';
    case 'EDQUOT': return 'the disk quota is used up';
    case 'EROFS': return 'the file system is read-only';
    case 'EACCES': case 'EPERM': return 'permission is denied';
    case 'ENOTDIR': return 'a part of the path is a file, not a directory';
    case 'ENOENT': return 'no such file or directory';
    case 'EISDIR': return 'it is a directory';
    case 'EEXIST': return 'it already exists';
    case 'EMFILE': case 'ENFILE': return 'too many files are open';
    case 'EIO': return 'the device reported an input/output error';
    case 'ENAMETOOLONG': return 'the name is too long';
    default: return (e as Error)?.message ?? String(e);
  }
}

/** A write that failed: the file, and the cause in words. */
export class FileWriteError extends Error {
  constructor(readonly file: string, override readonly cause: unknown, detail = '') {
    const words = fileErrorWords(cause);
    const code = (cause as NodeJS.ErrnoException)?.code;
    const advice = code === 'ENOSPC' || code === 'EDQUOT' ? ': free some space and try again' : code === 'EROFS' || code === 'EACCES' || code === 'EPERM' ? ': write somewhere you may write' : '';
    super(`cannot write ${file}: ${words}${advice}${detail}`);
    this.name = 'FileWriteError';
  }
  /** true for a full disk or quota (the run can be resumed once there is space) */
  get diskFull(): boolean {
    const code = (this.cause as NodeJS.ErrnoException)?.code;
    return code === 'ENOSPC' || code === 'EDQUOT';
  }
}

/**
 * The size of a regular file that is to be read whole or piece by piece:
 * devices, pipes and sockets are refused before they are opened (a pipe
 * would block, /dev/zero never ends), and so are files above `maxBytes`.
 * `fail` makes the error (its message names the file).
 */
export function regularFileSize(path: string, what: string, maxBytes: number, fail: (message: string) => Error): number {
  let stats;
  try {
    stats = statSync(path);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw fail(`${path}: ${code === 'ENOENT' ? `no such ${what}` : fileErrorWords(e)}`);
  }
  if (stats.isDirectory()) throw fail(`${path}: is a directory, not a ${what}`);
  if (!stats.isFile()) throw fail(`${path}: is not a regular file (a device, pipe or socket): give a ${what} on disk`);
  if (stats.size > maxBytes) throw fail(`${path}: is ${formatBytes(stats.size)}; a ${what} may be at most ${formatBytes(maxBytes)}`);
  return stats.size;
}

export function formatBytes(n: number): string {
  return n >= 2 ** 30 ? `${(n / 2 ** 30).toFixed(1)} GiB` : n >= 2 ** 20 ? `${(n / 2 ** 20).toFixed(1)} MiB` : n >= 1024 ? `${(n / 1024).toFixed(1)} KiB` : `${n} bytes`;
}

/** A byte source over a regular file, read on demand; call `close` when done. */
export function fileByteSource(path: string): ByteSource & { close(): void } {
  const fd = openSync(path, 'r');
  const size = fstatSync(fd).size;
  return {
    name: path,
    size,
    read: (into, position) => readSync(fd, into, 0, into.length, position),
    close: () => closeSync(fd),
  };
}

/**
 * Write bytes atomically (a temporary file beside it, then a rename), refusing
 * to replace an existing file unless `force`. A failed write removes its
 * temporary file and throws a FileWriteError naming the file and the cause.
 */
export function writeFileAtomic(path: string, bytes: Uint8Array | string, force = false, exists: (message: string) => Error = (m) => new Error(m)): void {
  if (!force && existsSync(path)) throw exists(`${path}: already exists; pass --force to overwrite it`);
  const tmp = `${path}.${process.pid}.tmp`;
  try {
    writeFileSync(tmp, bytes);
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw new FileWriteError(path, e);
  }
}

/** Temporary files an interrupted atomic write may have left (`NAME.PID.tmp`) in a directory and its subdirectories, removed. */
export function removeTemporaries(dir: string): number {
  let removed = 0;
  if (!existsSync(dir)) return 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) removed += removeTemporaries(p);
    else if (/\.\d+\.tmp$/.test(entry.name)) {
      rmSync(p, { force: true });
      removed++;
    }
  }
  return removed;
}

/**
 * Make a directory and its missing parents one level at a time (never
 * looping on a path the system will not create), each failure in words:
 * a part of the path that is a file, a read-only or full file system, a
 * permission. `fail` makes the error.
 */
export function ensureDirectory(dir: string, fail: (message: string) => Error): void {
  const target = resolve(dir);
  const missing: string[] = [];
  let at = target;
  while (!existsSync(at)) {
    missing.push(at);
    const up = dirname(at);
    if (up === at) break;
    at = up;
  }
  if (existsSync(at) && !statSync(at).isDirectory()) throw fail(`${dir}: ${at} is a file, not a directory`);
  for (const level of missing.reverse()) {
    try {
      mkdirSync(level);
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code === 'EEXIST' && statSync(level).isDirectory()) continue;
      // ENOENT when the parent exists: a file system that makes no directories there (/proc, /sys)
      throw fail(`cannot make the directory ${level}: ${code === 'ENOENT' ? 'the file system does not allow a directory there' : fileErrorWords(e)}`);
    }
  }
}

/** True when a directory holds no files (empty subdirectories, such as a stopped run's empty frames/, do not count). */
export function holdsNoFiles(dir: string): boolean {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) return true;
  return readdirSync(dir, { withFileTypes: true }).every((e) => e.isDirectory() && holdsNoFiles(join(dir, e.name)));
}
