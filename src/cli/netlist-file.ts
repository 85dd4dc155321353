/**
 * Reads a netlist file with a size limit. Light on purpose (no reader, no mathjs): `plenum run`
 * reads the text and hands it to its worker thread before it loads anything heavy.
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import type { Diagnostic } from '../diag/diagnostic.js';
import { MAX_SOURCE_BYTES, MAX_SOURCE_TEXT } from '../netlist/limits.js';
import { UsageError } from './io.js';

/** `-` names standard input (a netlist from a pipe); diagnostics then say `<stdin>`. */
export const STDIN = '-';

/** The name a netlist goes by in diagnostics and reports. */
export function netlistName(file: string): string {
  return file === STDIN ? '<stdin>' : file;
}

/**
 * The text of a netlist file for a command: `readBounded`, with a file that cannot be read at
 * all (missing, a directory, no permission) turned into a usage error.
 */
export function readNetlistFile(file: string): { text: string } | { tooLarge: Diagnostic } {
  const r = readBounded(file);
  if ('unreadable' in r) throw new UsageError(r.directory ? `${file}: is a directory, expected a netlist file (.yaml)` : `${file}: cannot read the netlist (${r.unreadable})`);
  return r;
}

/** What `readBounded` gives back. */
export type BoundedRead = { text: string } | { tooLarge: Diagnostic } | { unreadable: string; directory: boolean };

/**
 * The text of a file (a netlist or a study), read without ever holding more than the size limit
 * plus one chunk: a huge file, /dev/zero or an endless pipe is refused rather than read into
 * memory. Returns the text, the diagnostic for an input over the limit, or why the file cannot
 * be read (`ENOENT` as "no such file"; `directory` set for a directory). `-` reads standard
 * input (a pipe is read once, so the caller keeps the text).
 */
export function readBounded(file: string, what = 'the netlist'): BoundedRead {
  let fd: number;
  // /dev/stdin is read from the descriptor itself: reopening it fails for a socket (ENXIO)
  const stdin = file === STDIN || file === '/dev/stdin';
  try {
    fd = stdin ? 0 : openSync(file, 'r');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return { unreadable: code === 'ENOENT' ? 'no such file' : code ?? String(e), directory: false };
  }
  try {
    const st = fstatSync(fd);
    if (st.isDirectory()) return { unreadable: 'it is a directory', directory: true };
    const chunks: Buffer[] = [];
    let total = 0;
    const chunk = Buffer.alloc(64 * 1024);
    for (;;) {
      let n: number;
      try {
        n = readSync(fd, chunk, 0, chunk.length, null);
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code === 'EAGAIN') continue;
        return { unreadable: (e as NodeJS.ErrnoException).code ?? String(e), directory: false };
      }
      if (n === 0) break;
      chunks.push(Buffer.from(chunk.subarray(0, n)));
      total += n;
      if (total > MAX_SOURCE_BYTES) {
        const limit = MAX_SOURCE_TEXT;
        return {
          tooLarge: {
            code: 'input-too-large', severity: 'error', file: netlistName(file), line: 1, column: 1, path: [],
            message: st.isFile() ? `${what} is ${Math.max(st.size, total)} bytes, more than the limit of ${limit}` : `the input is longer than the limit of ${limit}`,
            hint: what === 'the netlist' ? 'split the network or generate a smaller netlist' : `plenum reads inputs up to ${limit}`,
          },
        };
      }
    }
    // invalid UTF-8 becomes U+FFFD, which the reader refuses as binary input
    return { text: Buffer.concat(chunks).toString('utf8') };
  } finally {
    if (!stdin) closeSync(fd);
  }
}

/**
 * The text of an input file other than a netlist (bench data, a trace, a shard), read with the
 * same limit; anything that cannot be read, or is too large, is a usage error naming it.
 */
export function readInputFile(file: string, what: string): string {
  const r = readBounded(file, what);
  if ('unreadable' in r) throw new UsageError(r.directory ? `${file}: is a directory, expected ${what}` : `${file}: cannot read ${what} (${r.unreadable})`);
  if ('tooLarge' in r) throw new UsageError(`${file}: ${r.tooLarge.message}; nothing was read`);
  return r.text;
}
