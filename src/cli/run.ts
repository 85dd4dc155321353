/** `plenum run NETLIST`: simulate, print a summary, write CSV/JSON. */
import { resultJson, simulate, summaryText, traceCsv } from '../index.js';
import { loadOrExit } from './load.js';
import { samePath, UsageError, writeAtomic } from './io.js';

export interface RunOptions { csv?: string; json?: string; quiet?: boolean }

export function runCommand(file: string, opts: RunOptions): number {
  for (const out of [opts.csv, opts.json]) {
    if (out && out !== '-' && samePath(out, file)) throw new UsageError(`refusing to overwrite the netlist ${file} with an output file`);
  }
  if (opts.csv === '-' && opts.json === '-') throw new UsageError('only one of --csv and --json can go to standard output (-)');
  const model = loadOrExit(file);

  let interrupted = false;
  const onSigint = (): void => { interrupted = true; };
  process.on('SIGINT', onSigint);
  const tty = Boolean(process.stderr.isTTY) && !process.env.CI;
  const result = simulate(model, {
    interrupt: () => (interrupted ? 'interrupted (Ctrl-C)' : null),
    progress: tty
      ? (t, tEnd) => process.stderr.write(`\r  simulating: t = ${t.toPrecision(4)} s of ${tEnd} s (${Math.floor((100 * t) / tEnd)} %)   `)
      : undefined,
  });
  process.off('SIGINT', onSigint);
  if (tty) process.stderr.write('\r\x1b[K');

  const toStdout = opts.json === '-' || opts.csv === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(summaryText(result));
  if (opts.json) {
    const text = resultJson(result);
    if (opts.json === '-') process.stdout.write(text); else writeAtomic(opts.json, text);
  }
  if (opts.csv) {
    const text = traceCsv(result.trace);
    if (opts.csv === '-') process.stdout.write(text); else writeAtomic(opts.csv, text);
  }
  if (result.status === 'failed') return 3;
  return result.expectations.every((e) => e.passed) ? 0 : 1;
}
