/** Small helpers shared by the calibrate and size commands: numbers, files, progress on a terminal. */
import { UsageError } from './io.js';
import { readInputFile } from './netlist-file.js';

export function wholeNumber(text: string | undefined, option: string, min: number): number | undefined {
  if (text === undefined) return undefined;
  if (!/^\d+$/.test(text.trim()) || !Number.isSafeInteger(Number(text)) || Number(text) < min) {
    throw new UsageError(`${option} ${text}: expected a whole number of at least ${min}`);
  }
  return Number(text);
}

/** A file read with the netlist size limit (a huge file or a device is refused). */
export function readText(file: string, what: string): string {
  return readInputFile(file, what);
}

/**
 * A progress line on standard error, rewritten in place, at most ten times a second; only when
 * standard error is a terminal and not quiet (undefined otherwise). Called with '' to clear.
 */
export function progressLine(quiet: boolean): ((text: string) => void) | undefined {
  if (quiet || !process.stderr.isTTY || process.env.CI) return undefined;
  let last = 0;
  return (text: string) => {
    if (text === '') { process.stderr.write('\r\x1b[K'); return; }
    const now = Date.now();
    if (now - last < 100) return;
    last = now;
    process.stderr.write(`\r\x1b[K${text}`);
  };
}
