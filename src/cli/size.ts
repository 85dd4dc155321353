/**
 * `plenum size NETLIST --free PATH=LOW..HIGH ... [--minimise|--maximise PATH] [--margin X]
 * [--robust 'PATH±TOL' ...]`: values for which every expectation passes with the margin.
 * Exit 0 found, 1 infeasible (no value in the ranges passes), 2 bad netlist or options,
 * 3 the simulations failed.
 */
import { formatDiagnostic } from '../diag/diagnostic.js';
import { netlistWithValues, size, sizeJson, sizeText } from '../index.js';
import { checkOutputPaths, UsageError, writeOutput } from './io.js';
import { progressLine, readText, wholeNumber } from './study-io.js';

export interface SizeCliOptions {
  free: string[];
  minimise?: string;
  maximise?: string;
  margin?: string;
  robust: string[];
  samples?: string;
  seed?: string;
  jobs?: string;
  json?: string;
  writeNetlist?: string;
  quiet?: boolean;
}

export async function sizeCommand(file: string, opts: SizeCliOptions): Promise<number> {
  if (!opts.free.length) throw new UsageError('size needs --free PATH=LOW..HIGH (what to size)');
  checkOutputPaths(file, { '--json': opts.json, '--write-netlist': opts.writeNetlist });
  if (opts.json === '-' && opts.writeNetlist === '-') throw new UsageError('only one output can go to standard output (-)');
  let margin: number | undefined;
  if (opts.margin !== undefined) {
    const t = opts.margin.trim();
    margin = t.endsWith('%') ? Number(t.slice(0, -1)) / 100 : Number(t);
    if (t === '' || !Number.isFinite(margin)) throw new UsageError(`--margin ${opts.margin}: expected a fraction such as 0.1 or 10%`);
  }
  const source = readText(file, 'the netlist');
  const progress = progressLine(Boolean(opts.quiet));
  const r = await size({
    source, file, free: opts.free, minimise: opts.minimise, maximise: opts.maximise, margin, robust: opts.robust,
    samples: wholeNumber(opts.samples, '--samples', 1), seed: wholeNumber(opts.seed, '--seed', 0), jobs: wholeNumber(opts.jobs, '--jobs', 1),
    progress: progress ? (k, what) => progress(`  ${what}: ${k} simulations`) : undefined,
  });
  progress?.('');
  if (!r.ok) {
    const n = r.diagnostics.filter((d) => d.severity === 'error').length;
    throw new UsageError(`${r.diagnostics.map(formatDiagnostic).join('\n')}\n${n} error${n === 1 ? '' : 's'}; nothing was run or written`);
  }
  const rep = r.value;
  const toStdout = opts.json === '-' || opts.writeNetlist === '-';
  if (!opts.quiet) (toStdout ? process.stderr : process.stdout).write(sizeText(rep, file));
  if (opts.json) {
    const text = sizeJson(rep);
    if (opts.json === '-') process.stdout.write(text); else writeOutput(opts.json, text, '--json');
  }
  if (opts.writeNetlist && rep.status === 'found') {
    const text = netlistWithValues(source, rep.parameters.map((p) => ({ path: p.path, text: p.text })), `sized with plenum size (${rep.binding} binds):\n${rep.parameters.map((p) => `  ${p.path} = ${p.text}`).join('\n')}`);
    if (opts.writeNetlist === '-') process.stdout.write(text); else writeOutput(opts.writeNetlist, text, '--write-netlist');
  }
  if (rep.status === 'failed') {
    process.stderr.write(`plenum: ${rep.message}\n`);
    return 3;
  }
  return rep.status === 'found' ? 0 : 1;
}
