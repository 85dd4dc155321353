/**
 * The progress line of long commands (run, report, sweep), on standard error.
 *
 * Shown only where a person watches: standard error is a terminal, `CI` is not set and `-q`
 * was not given; and only once the command has been busy for DELAY_MS, so a run that takes
 * under a second prints nothing. With `TERM=dumb` or `NO_COLOR` set the line is rewritten with
 * a carriage return and spaces only, never an ANSI escape sequence.
 */

/** How long a command runs before its progress line appears. */
export const DELAY_MS = 1000;

/** What the progress line needs of its surroundings (injectable for tests). */
export interface ProgressHost {
  stream: { isTTY?: boolean; write(text: string): unknown };
  env: Record<string, string | undefined>;
  now: () => number;
}

export interface Progress {
  /** False when no line will ever be shown (callers then need not report progress at all). */
  readonly active: boolean;
  /** Shows `text` as the current progress (after the delay). */
  update(text: string): void;
  /** Removes the line, if one was shown. */
  clear(): void;
}

const silent: Progress = { active: false, update: () => undefined, clear: () => undefined };

export function progressLine(quiet: boolean | undefined, host: ProgressHost = { stream: process.stderr, env: process.env, now: () => Date.now() }): Progress {
  const { stream, env, now } = host;
  if (quiet || !stream.isTTY || env.CI) return silent;
  const plain = env.TERM === 'dumb' || env.NO_COLOR !== undefined;
  const start = now();
  let width = 0;
  return {
    active: true,
    update(text) {
      if (now() - start < DELAY_MS) return;
      const pad = plain ? ' '.repeat(Math.max(0, width - text.length)) : '';
      stream.write(plain ? `\r${text}${pad}` : `\r${text}\x1b[K`);
      width = Math.max(width, text.length);
    },
    clear() {
      if (!width) return;
      stream.write(plain ? `\r${' '.repeat(width)}\r` : '\r\x1b[K');
      width = 0;
    },
  };
}

/** The progress text of a simulation. */
export function simulationProgress(t: number, tEnd: number): string {
  return `  simulating: t = ${t.toPrecision(4)} s of ${tEnd} s (${Math.floor((100 * t) / tEnd)} %)`;
}
