/** Output files are written whole or not at all: write a temporary sibling, then rename. */
import { closeSync, fsyncSync, openSync, realpathSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

/**
 * Writes `text` to `path` through a temporary file in the same directory and a rename, so
 * that a reader sees the old file or the new one, never a part. On any failure the temporary
 * file is removed and the error passed on (the file at `path` is then untouched).
 */
export function writeAtomic(path: string, text: string): void {
  const dir = dirname(resolve(path));
  const tmp = join(dir, `.${basename(path)}.${process.pid}.tmp`);
  try { unlinkSync(tmp); } catch { /* no stale file of this process */ }
  // 'wx' (O_EXCL) creates the file or fails: it never follows a link planted at the name
  const fd = openSync(tmp, 'wx');
  try {
    try {
      writeSync(fd, text);
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
    renameSync(tmp, path);
  } catch (e) {
    try { unlinkSync(tmp); } catch { /* already gone */ }
    throw e;
  }
}

/** writeAtomic for a command's output: a failure is a usage error naming the option and the file. */
export function writeOutput(path: string, text: string, what: string): void {
  try {
    writeAtomic(path, text);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new UsageError(`cannot write ${what} ${path} (${code ?? String(e)}); nothing was written there`);
  }
}

/**
 * Checks the output paths of a command before any work: none is the netlist, none is a
 * directory, each lies in an existing directory, and no two are the same file. `-` (standard
 * output) and absent options are skipped. Keys are the option names, for messages.
 */
export function checkOutputPaths(netlist: string, outputs: Record<string, string | undefined>): void {
  const given = Object.entries(outputs).filter((e): e is [string, string] => e[1] !== undefined && e[1] !== '-');
  given.forEach(([option, path], i) => {
    if (samePath(path, netlist)) throw new UsageError(`refusing to overwrite the netlist ${netlist} with ${option}`);
    const other = given.slice(0, i).find(([, p]) => samePath(p, path));
    if (other) throw new UsageError(`${other[0]} and ${option} name the same file ${path}`);
    let isDir = false;
    try { isDir = statSync(path).isDirectory(); } catch { /* does not exist yet: fine */ }
    if (isDir) throw new UsageError(`${option} ${path} is a directory; give a file name`);
    const dir = dirname(resolve(path));
    let dirOk = false;
    try { dirOk = statSync(dir).isDirectory(); } catch { /* reported below */ }
    if (!dirOk) throw new UsageError(`${option} ${path}: the directory ${dir} does not exist`);
  });
}

/** True when two paths name the same file (so an output never overwrites the input). */
export function samePath(a: string, b: string): boolean {
  const real = (p: string): string => {
    try { return realpathSync(p); } catch { return resolve(p); }
  };
  if (real(a) === real(b)) return true;
  // hard links: two names, one file
  try {
    const sa = statSync(a);
    const sb = statSync(b);
    return sa.ino === sb.ino && sa.dev === sb.dev;
  } catch {
    return false;
  }
}

/** A user-facing error: printed without a stack trace, with an exit code. */
export class UsageError extends Error {
  constructor(message: string, readonly exitCode = 2) {
    super(message);
  }
}

/** Fails early (before simulating) when a plots directory cannot be one. */
export function checkPlotsDir(dir: string): void {
  let isDir = true;
  try { isDir = statSync(dir).isDirectory(); } catch { /* absent: created after the run */ }
  if (!isDir) throw new UsageError(`--plots ${dir} exists and is not a directory`);
}

/**
 * `-` as an output file means standard output. At most one output of a command may go there;
 * returns true when one does (the command's own summary then goes to standard error).
 */
export function toStdout(outputs: Record<string, string | undefined>): boolean {
  const dash = Object.entries(outputs).filter(([, v]) => v === '-').map(([k]) => k);
  if (dash.length > 1) throw new UsageError(`only one of ${dash.join(' and ')} can go to standard output (-)`);
  return dash.length === 1;
}

/** Writes a command's output: to standard output for `-`, else whole to the file (writeOutput). */
export function emit(path: string, text: string, what: string): void {
  if (path === '-') process.stdout.write(text);
  else writeOutput(path, text, what);
}

/**
 * A reader that closes the pipe early (`plenum schema | head -1`) is not an error: further
 * output is dropped and the command ends with its usual exit status, without the EPIPE stack
 * trace Node prints for an unhandled stream error.
 */
export function quietOnClosedPipe(): void {
  for (const stream of [process.stdout, process.stderr]) {
    stream.on('error', (e: NodeJS.ErrnoException) => {
      if (e.code === 'EPIPE' || e.code === 'ERR_STREAM_DESTROYED') return;
      throw e;
    });
  }
}
