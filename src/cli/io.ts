/**
 * Output files are written whole or not at all, and only where they should go.
 *
 * A regular file (new or existing) is written to a temporary sibling and renamed into place, so
 * a reader sees the old file or the new one, never a part. A symbolic link to an existing file
 * is followed: the file it points to is replaced the same way and the link stays a link. A
 * character device (`/dev/null`, a terminal) or a named pipe is written through, never replaced
 * (renaming onto `/dev/null` as root would replace the system's). Anything else (a block
 * device, a socket, a dangling link, a directory) is refused before any work.
 *
 * A command's outputs are written together (`writeOutputs`): every file is first written to its
 * temporary sibling, and only when all of them are complete are they renamed into place, so a
 * failure on the second output leaves the first untouched too (exit 2, nothing written).
 */
import { closeSync, fsyncSync, lstatSync, mkdirSync, openSync, realpathSync, renameSync, statSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

/**
 * One output of a command: where, what, and the option that named it (for messages). `staged`
 * instead of `text`: a temporary file already written whole (see `stagingPath`), renamed into
 * place with the others.
 */
export type OutputFile = { path: string; what: string } & ({ text: string; staged?: undefined } | { staged: string; text?: undefined });

/** Where the bytes for an output path go: a file replaced by rename, or a device or pipe written through. */
interface Target { kind: 'file' | 'stream'; path: string }

/** A user-facing error: printed without a stack trace, with an exit code. */
export class UsageError extends Error {
  constructor(message: string, readonly exitCode = 2) {
    super(message);
  }
}

const errCode = (e: unknown): string => (e as NodeJS.ErrnoException).code ?? String(e);

/**
 * Where writing `path` goes: the path itself for a new or regular file, the file a symbolic
 * link points to, or a character device or pipe to write through. Throws a UsageError for
 * anything else.
 */
function targetOf(path: string, what: string): Target {
  let st;
  try {
    st = lstatSync(path);
  } catch {
    return { kind: 'file', path }; // does not exist yet
  }
  let real = path;
  if (st.isSymbolicLink()) {
    try {
      real = realpathSync(path);
      st = statSync(real);
    } catch {
      throw new UsageError(`${what} ${path} is a symbolic link to nothing (or a loop of links); give the path of a file`);
    }
  }
  if (st.isFile()) return { kind: 'file', path: real };
  if (st.isCharacterDevice() || st.isFIFO()) return { kind: 'stream', path: real };
  if (st.isDirectory()) throw new UsageError(`${what} ${path} is a directory; give a file name`);
  throw new UsageError(`${what} ${path} is ${st.isBlockDevice() ? 'a block device' : st.isSocket() ? 'a socket' : 'not a regular file'}; plenum writes only files, character devices and pipes`);
}

export function writeAll(fd: number, text: string): void {
  const buf = Buffer.from(text, 'utf8');
  let off = 0;
  while (off < buf.length) {
    try {
      off += writeSync(fd, buf, off, buf.length - off);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EAGAIN') throw e;
    }
  }
}

/**
 * The temporary file to write an output into before it is renamed into place (by
 * `writeOutputs` with `staged`), or undefined when the output is not a file (a device, a pipe)
 * and must be written through at the end.
 */
export function stagingPath(path: string, what: string): string | undefined {
  const t = targetOf(path, what);
  if (t.kind !== 'file') return undefined;
  const tmp = tmpName(t.path);
  try { unlinkSync(tmp); } catch { /* no stale file of this process */ }
  return tmp;
}

function tmpName(path: string): string {
  return join(dirname(resolve(path)), `.${basename(path)}.${process.pid}.tmp`);
}

/** Writes a temporary sibling of `path` whole (fsync'd); removes it and rethrows on failure. */
function writeTemp(path: string, text: string): string {
  const tmp = tmpName(path);
  try { unlinkSync(tmp); } catch { /* no stale file of this process */ }
  // 'wx' (O_EXCL) creates the file or fails: it never follows a link planted at the name
  const fd = openSync(tmp, 'wx');
  try {
    try {
      writeAll(fd, text);
      fsyncSync(fd);
    } finally {
      closeSync(fd);
    }
  } catch (e) {
    try { unlinkSync(tmp); } catch { /* already gone */ }
    throw e;
  }
  return tmp;
}

function writeStream(path: string, text: string): void {
  const fd = openSync(path, 'w');
  try {
    writeAll(fd, text);
  } finally {
    closeSync(fd);
  }
}

/**
 * Writes `text` to `path` whole or not at all (see the module comment); errors are passed on
 * and the file at `path` is then untouched.
 */
export function writeAtomic(path: string, text: string): void {
  const t = targetOf(path, 'output');
  if (t.kind === 'stream') return writeStream(t.path, text);
  const tmp = writeTemp(t.path, text);
  try {
    renameSync(tmp, t.path);
  } catch (e) {
    try { unlinkSync(tmp); } catch { /* already gone */ }
    throw e;
  }
}

/**
 * Writes a command's outputs together: all files to temporary siblings first, then renamed into
 * place. Any failure removes the temporary files and becomes a usage error naming the option
 * and the file (nothing was written, unless a device or pipe had already taken its output).
 * `-` is not a path here: the caller prints standard output itself.
 */
export function writeOutputs(files: readonly OutputFile[]): void {
  // staged files are ours to remove from the start, whatever fails
  const temps: (string | null)[] = files.map((f) => f.staged ?? null);
  let targets: Target[];
  try {
    targets = files.map((f) => targetOf(f.path, f.what));
  } catch (e) {
    for (const tmp of temps) if (tmp) try { unlinkSync(tmp); } catch { /* already gone */ }
    throw e;
  }
  const fail = (f: OutputFile, e: unknown, none: boolean): UsageError =>
    new UsageError(`cannot write ${f.what} ${f.path} (${errCode(e)})${none ? '; nothing was written' : ''}`);
  try {
    files.forEach((f, i) => {
      try {
        if (f.text !== undefined && targets[i].kind === 'file') temps[i] = writeTemp(targets[i].path, f.text);
      } catch (e) {
        throw fail(f, e, true);
      }
    });
    // devices and pipes cannot be staged: written before the renames, so that their failure
    // (a full device) still leaves every file as it was
    let streamed = false;
    files.forEach((f, i) => {
      if (targets[i].kind !== 'stream' || f.text === undefined) return;
      try {
        writeStream(targets[i].path, f.text);
        streamed = true;
      } catch (e) {
        throw fail(f, e, !streamed);
      }
    });
    files.forEach((f, i) => {
      const tmp = temps[i];
      if (tmp === null) return;
      try {
        renameSync(tmp, targets[i].path);
        temps[i] = null;
      } catch (e) {
        throw fail(f, e, false);
      }
    });
  } finally {
    for (const tmp of temps) if (tmp) try { unlinkSync(tmp); } catch { /* already gone */ }
  }
}

/** writeOutputs for one file. */
export function writeOutput(path: string, text: string, what: string): void {
  writeOutputs([{ path, text, what }]);
}

/**
 * A command's outputs: `-` for standard output printed, the files written together with
 * `writeOutputs`. `stdout` is printed last, after every file is in place.
 */
export function emitOutputs(outs: readonly { path: string | undefined; text: () => string; what: string }[]): void {
  const files: OutputFile[] = [];
  let stdout: string | undefined;
  for (const o of outs) {
    if (!o.path) continue;
    if (o.path === '-') stdout = o.text();
    else files.push({ path: o.path, text: o.text(), what: o.what });
  }
  writeOutputs(files);
  if (stdout !== undefined) process.stdout.write(stdout);
}

/**
 * Checks the output paths of a command before any work: none is the netlist (or another input),
 * none is a directory, a block device, a socket or a dangling link, each lies in an existing
 * directory, and no two are the same file. `-` (standard output) and absent options are skipped.
 * Keys are the option names, for messages.
 */
export function checkOutputPaths(netlist: string | readonly string[], outputs: Record<string, string | undefined>): void {
  const inputs = typeof netlist === 'string' ? [netlist] : netlist;
  const given = Object.entries(outputs).filter((e): e is [string, string] => e[1] !== undefined && e[1] !== '-');
  const stdout = Object.entries(outputs).filter((e) => e[1] === '-');
  if (stdout.length > 1) throw new UsageError(`only one of ${stdout.map((e) => e[0]).join(' and ')} can go to standard output (-)`);
  given.forEach(([option, path], i) => {
    for (const input of inputs) {
      if (samePath(path, input)) throw new UsageError(`refusing to overwrite the ${typeof netlist === 'string' ? 'netlist' : 'input'} ${input} with ${option}`);
    }
    const other = given.slice(0, i).find(([, p]) => samePath(p, path));
    if (other) throw new UsageError(`${other[0]} and ${option} name the same file ${path}`);
    const t = targetOf(path, option);
    if (t.kind === 'stream') return;
    const dir = dirname(resolve(t.path));
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

/**
 * Fails early (before simulating) when a plots directory cannot be one: it exists and is not a
 * directory, or it does not exist and neither does its parent (only the last level is created).
 */
export function checkPlotsDir(dir: string): void {
  let st;
  try { st = statSync(dir); } catch { /* absent: created after the run */ }
  if (st && !st.isDirectory()) throw new UsageError(`--plots ${dir} exists and is not a directory`);
  if (st) return;
  const parent = dirname(resolve(dir));
  let parentOk = false;
  try { parentOk = statSync(parent).isDirectory(); } catch { /* reported below */ }
  if (!parentOk) throw new UsageError(`--plots ${dir}: the directory ${parent} does not exist`);
}

/**
 * Creates a plots directory (its last level only: a recursive creation under a pseudo file
 * system such as /proc never ends). An existing directory is fine.
 */
export function makePlotsDir(dir: string): void {
  try {
    if (statSync(dir).isDirectory()) return;
  } catch { /* absent */ }
  try {
    mkdirSync(dir);
  } catch (e) {
    throw new UsageError(`cannot create --plots ${dir} (${errCode(e)}); nothing was written`);
  }
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
