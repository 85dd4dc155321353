/** Output files are written whole or not at all: write a temporary sibling, then rename. */
import { closeSync, fsyncSync, openSync, realpathSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';

export function writeAtomic(path: string, text: string): void {
  const dir = dirname(resolve(path));
  const tmp = join(dir, `.${basename(path)}.${process.pid}.tmp`);
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  try {
    renameSync(tmp, path);
  } catch (e) {
    try { unlinkSync(tmp); } catch { /* already gone */ }
    throw e;
  }
}

/** True when two paths name the same file (so an output never overwrites the input). */
export function samePath(a: string, b: string): boolean {
  const real = (p: string): string => {
    try { return realpathSync(p); } catch { return resolve(p); }
  };
  return real(a) === real(b);
}

/** A user-facing error: printed without a stack trace, with an exit code. */
export class UsageError extends Error {
  constructor(message: string, readonly exitCode = 2) {
    super(message);
  }
}
