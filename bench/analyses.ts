/**
 * Rest analyses at scale, through the bundled CLI (whole process): `plenum trace` of a closed
 * chain of 200 linear chambers (the wall compliance of the first one from 0.1 to 0.4 mL/kPa: one
 * branch of 24 points; and the gas of the chain from 5 g to 15 g: 315 points) and
 * `plenum equilibria` of a closed chain of 200 neo-Hookean spheres (2^200 branch combinations)
 * under its default time budget of 30 s. Run alone: `npx tsx bench/analyses.ts`.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fmt, runCli, table, type CliRun } from './measure.js';
import { linearChainNetlist, sphereChainNetlist } from './networks.js';

export interface AnalysisRow {
  what: string;
  wallS: number;
  cpuS: number;
  peakMB: number;
  exit: number | null;
  result: string;
}

function best(runs: CliRun[]): CliRun {
  return runs.reduce((a, b) => (b.wallS < a.wallS ? b : a));
}

export function analysesAtScale(work: string, usage: string, repeat: number): AnalysisRow[] {
  const lin = join(work, 'linear-200.yaml');
  const sph = join(work, 'spheres-200.yaml');
  writeFileSync(lin, linearChainNetlist(200));
  writeFileSync(sph, sphereChainNetlist(200));
  const rows: AnalysisRow[] = [];
  const traces: [string, string[]][] = [
    ['trace of 200 linear chambers (compliance of one, 24 points)', ['--vary', 'chambers.c0.compliance', '--from', '0.1 mL/kPa', '--to', '0.4 mL/kPa']],
    ['trace of 200 linear chambers (gas of the chain, 315 points)', ['--vary', 'mass:c0', '--from', '5 g', '--to', '15 g']],
  ];
  for (const [what, args] of traces) {
    const json = join(work, 'trace.json');
    const r = best(Array.from({ length: repeat }, () => runCli(['trace', lin, ...args, '-q', '--json', json], usage)));
    const j = JSON.parse(readFileSync(json, 'utf8')) as { branches: { points: unknown[] }[]; timed_out: boolean };
    rows.push({ what, wallS: r.wallS, cpuS: r.cpuS, peakMB: r.peakMB, exit: r.exit, result: `${j.branches.length} branch, ${j.branches.reduce((a, b) => a + b.points.length, 0)} points${j.timed_out ? ', timed out' : ''}` });
  }
  {
    const json = join(work, 'eq.json');
    const r = runCli(['equilibria', sph, '-q', '--json', json], usage);
    const j = JSON.parse(readFileSync(json, 'utf8')) as { count: number; timed_out: boolean; equilibria: { stable: boolean }[]; groups: { examined: number; combinations: number }[] };
    rows.push({
      what: 'equilibria of a chain of 200 spheres (2^200 branch combinations), default budget 30 s', wallS: r.wallS, cpuS: r.cpuS, peakMB: r.peakMB, exit: r.exit,
      result: `${j.count} equilibria (${j.equilibria.filter((e) => e.stable).length} stable), ${j.groups[0].examined} of ${j.groups[0].combinations} starts, ${j.timed_out ? 'budget ran out: incomplete' : 'within the budget'}`,
    });
  }
  return rows;
}

export function analysesTable(rows: AnalysisRow[]): string {
  return table(['analysis', 'wall s', 'CPU s', 'peak MB', 'result'], rows.map((r) => [r.what, fmt(r.wallS), fmt(r.cpuS), fmt(r.peakMB), r.result]));
}

if (process.argv[1] && process.argv[1].endsWith('analyses.ts')) {
  const work = mkdtempSync(join(tmpdir(), 'plenum-analyses-'));
  try {
    const rows = analysesAtScale(work, join(work, 'usage.json'), Number(process.argv[2] ?? 3));
    process.stdout.write(`${analysesTable(rows)}\n`);
  } finally {
    rmSync(work, { recursive: true, force: true });
  }
}
