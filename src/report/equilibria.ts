/**
 * Equilibria and traced branches for people (compact tables) and machines (JSON, CSV; SI).
 */
import type { ChamberRest, EquilibriaResult } from '../equilibria/equilibria.js';
import type { TraceResult } from '../equilibria/continuation.js';
import { display, significant } from '../units/display.js';
import { nameList } from './table.js';
import { printable } from '../diag/text.js';

/** JSON has no Infinity/NaN: write them as null. */
function json(value: unknown): string {
  return JSON.stringify(value, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}

function table(head: string[], rows: string[][]): string {
  const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (cells: string[]): string => cells.map((c, i) => (i === 0 ? c.padStart(w[i]) : c.padEnd(w[i]))).join('  ').trimEnd();
  return [line(head), line(w.map((n) => '-'.repeat(n))), ...rows.map(line)].join('\n');
}

/** A count that may be astronomically large (2^N branch combinations). */
function count(x: number): string {
  if (!Number.isFinite(x)) return 'more than 1e308';
  if (x < 1e6) return String(x);
  const e = Math.log2(x);
  return Number.isInteger(e) ? `2^${e} (${x.toPrecision(3)})` : x.toPrecision(3);
}

function rate(x: number | null): string {
  return x === null ? '-' : Number.isFinite(x) ? x.toPrecision(4) : 'n/a';
}

function cell(c: ChamberRest): string {
  const size = c.stretch !== undefined ? `λ ${c.stretch.toFixed(4)}` : display(c.volume, 'volume');
  const branch = c.branch === 'rigid' ? '' : c.branch === 'rising' ? (c.segment === 0 ? ' R' : ` R${c.segment + 1}`) : ' F';
  return `${display(c.gauge, 'gauge').replace(' gauge', '')} ${size}${branch}`;
}

/** Chambers up to which the table has a column a chamber; above, a row a chamber. */
const WIDE_MAX_CHAMBERS = 8;
/** Equilibria up to which the table with a row a chamber is used. */
const TALL_MAX_EQUILIBRIA = 12;

/** The printed summary of `plenum equilibria`. */
export function equilibriaText(r: EquilibriaResult): string {
  const out: string[] = [];
  out.push(`${printable(r.title)}  (${printable(r.file)})`);
  const valves = r.valves === 'end' ? 'valves as at the end of their schedules' : `valves ${r.valves}`;
  out.push(`${valves}; gas as held at the ${r.gas === 'start' ? 'start' : 'end of the transient'}; ${r.message}`);
  for (const g of r.groups) {
    const what = g.kind === 'closed'
      ? `closed, ${display(g.mass ?? 0, 'mass')} of gas`
      : g.kind === 'open' ? `open${g.flowing.length ? `, gas passing ${g.flowing.join(', ')}` : ''}` : 'fed, no outlet';
    const how = g.method === 'enumeration' ? `by enumeration of ${g.combinations} branch combination${g.combinations === 1 ? '' : 's'}`
      : g.method === 'deflation' ? `by deflated Newton from ${g.combinations} starts (may be incomplete)`
        : g.method === 'steady-flow' ? 'from the steady flow'
          : g.method === 'closed-loop' ? `by Newton on the whole state (controllers, regulators) from ${g.combinations} start${g.combinations === 1 ? '' : 's'} (may be incomplete)` : '';
    out.push(`group ${nameList(g.chambers)} (${what}): ${g.equilibria.length} equilibri${g.equilibria.length === 1 ? 'um' : 'a'} ${how}`.trimEnd());
    for (const n of g.notes) out.push(`  note: ${n}`);
  }
  if (!r.complete) {
    const why = r.timed_out ? `the time budget of ${significant(r.max_wall, 3)} s ran out (--max-wall)` : 'a group was searched, not enumerated';
    out.push(`incomplete: ${why}; the list may miss equilibria`);
    for (const g of r.groups.filter((x) => !x.complete)) {
      const what = g.method === 'deflation' ? `${g.examined} Newton start${g.examined === 1 ? '' : 's'} of ${g.combinations} tried` : `${count(g.examined)} examined`;
      out.push(`  group ${nameList(g.chambers)}: ${count(g.branch_combinations)} branch combinations, ${what}`);
    }
  }
  out.push('');
  if (r.equilibria.length) {
    const names = Object.keys(r.equilibria[0].chambers);
    const reached = r.transient?.reached ?? null;
    const rows = r.equilibria.map((e, i) => [
      `${reached === i ? '*' : ''}${i + 1}`,
      e.stability + (e.consistent ? '' : ' (!)'),
      rate(e.growth_rate),
      e.time_constant === null ? '-' : display(e.time_constant, 'time'),
      ...names.map((n) => cell(e.chambers[n])),
    ]);
    if (names.length <= WIDE_MAX_CHAMBERS) {
      out.push(table(['#', 'stability', 'growth 1/s', 'slowest τ', ...names], rows));
    } else {
      // many chambers: a chamber a row, an equilibrium a column (the first twelve; all are in the JSON)
      out.push(table(['#', 'stability', 'growth 1/s', 'slowest τ'], rows.map((row) => row.slice(0, 4))));
      out.push('');
      const shown = r.equilibria.slice(0, TALL_MAX_EQUILIBRIA);
      out.push(table(['chamber', ...shown.map((_, i) => `#${i + 1}`)], names.map((n) => [n, ...shown.map((e) => cell(e.chambers[n]))])));
      if (r.equilibria.length > shown.length) out.push(`(chambers of the first ${shown.length} equilibria; --json lists every one)`);
    }
    out.push('(kPa gauge; λ stretch; R rising, F falling branch of the wall curve, R3 rising again past a minimum)');
    if (reached !== null) out.push('* the equilibrium the transient reaches');
    r.equilibria.forEach((e, i) => {
      for (const w of e.warnings) out.push(`(!) #${i + 1}: ${w}`);
      for (const n of e.notes) out.push(`    #${i + 1}: ${n}`);
    });
    if (r.count > r.equilibria.length) out.push(`... ${r.count - r.equilibria.length} more not listed`);
    out.push('');
  }
  for (const c of r.cylinders ?? []) {
    const sides = `cap ${c.sides.cap}${c.sides.rod ? `, rod ${c.sides.rod}` : ''}`;
    out.push(`cylinder ${c.cylinder} (${sides}): ${c.note ?? `${c.rests.length} rest position${c.rests.length === 1 ? '' : 's'}`}`);
    for (const e of c.rests) {
      const where = e.where === 'inside' ? display(e.position, 'position') : `at its ${e.where}`;
      const dyn = e.stiffness === null ? (e.stable ? 'held by the force' : 'not held: the force is zero at the stop')
        : e.stable
          ? `stable: stiffness ${significant(e.stiffness, 4)} N/m, ${e.omega !== null ? `natural frequency ${significant(e.omega / (2 * Math.PI), 4)} Hz, damping ratio ${significant(e.damping ?? 0, 3)}` : ''}`
          : `unstable: stiffness ${significant(e.stiffness, 4)} N/m (the force grows away from it)`;
      const band = e.friction_band ? `; static friction holds it anywhere in ${display(e.friction_band[0], 'position')} … ${display(e.friction_band[1], 'position')}` : '';
      out.push(`  ${where}: ${dyn}${band}`);
    }
  }
  if (r.cylinders?.length) out.push('');
  if (r.transient) {
    out.push(`transient (${display(r.transient.end, 'time')}): ${r.transient.message}`);
    for (const o of r.transient.outcomes) {
      out.push(`  ${o.chambers.join(', ')}: ${o.outcome}${o.settling_time !== null ? ` by ${display(o.settling_time, 'time')}` : ''} (${o.evidence})`);
    }
  }
  for (const n of r.notes) out.push(`note: ${n}`);
  return out.join('\n') + '\n';
}

/** The machine-readable result of `plenum equilibria` (SI units). */
export function equilibriaJson(r: EquilibriaResult): string {
  return json({
    format: r.format, title: r.title, status: r.status, message: r.message,
    valves: r.valves, gas: r.gas, heat: r.heat, ambient: r.ambient,
    count: r.count, complete: r.complete, timed_out: r.timed_out, max_wall: r.max_wall,
    equilibria: r.equilibria.map((e) => ({
      chambers: e.chambers, stable: e.stable, stability: e.stability, growth_rate: e.growth_rate,
      time_constant: e.time_constant, eigenvalues: e.eigenvalues, consistent: e.consistent,
      warnings: e.warnings, notes: e.notes, groups: e.members,
    })),
    groups: r.groups.map((g) => ({
      chambers: g.chambers, kind: g.kind, mass: g.mass, method: g.method, combinations: g.combinations,
      branch_combinations: g.branch_combinations, examined: g.examined, timed_out: g.timed_out,
      complete: g.complete, flowing: g.flowing, notes: g.notes, count: g.equilibria.length,
    })),
    transient: r.transient,
    notes: r.notes,
    ...(r.cylinders ? { cylinders: r.cylinders } : {}),
  });
}

/** The printed summary of `plenum trace`. */
export function traceText(r: TraceResult): string {
  const out: string[] = [];
  const u = r.parameter.unit ? ` ${r.parameter.unit}` : '';
  const v = (x: number): string => `${+x.toPrecision(6)}${u}`;
  out.push(`${printable(r.title)}  (${printable(r.file)})`);
  out.push(`${r.parameter.vary} from ${v(r.parameter.from)} to ${v(r.parameter.to)}: ${r.message}`);
  out.push('');
  for (const b of r.branches) {
    const ps = b.points.map((p) => p.parameter);
    const stable = b.points.filter((p) => p.stable).length;
    out.push(`branch ${b.id} (${nameList(b.chambers)}): ${b.points.length} points, ${r.parameter.vary} ${v(Math.min(...ps))} .. ${v(Math.max(...ps))}, stable at ${stable} of them`);
    for (const p of b.points) {
      if (!p.special || p.special === 'end') continue;
      const states = Object.entries(p.chambers).map(([n, c]) => `${n} ${cell(c)}`).join(', ');
      out.push(`  ${p.special} at ${v(p.parameter)}: ${states}`);
    }
    out.push(`  ends: ${b.ends[0]}; ${b.ends[1]}`);
  }
  if (r.timed_out) out.push(`incomplete: the time budget of ${significant(r.max_wall, 3)} s ran out (--max-wall): the branches traced so far are listed`);
  for (const n of r.notes) out.push(`note: ${n}`);
  return out.join('\n') + '\n';
}

/** Traced branches as JSON (SI units; the parameter in the unit of --from/--to). */
export function traceJson(r: TraceResult): string {
  return json(r);
}

/** Traced branches as CSV: one row per point, chambers' columns as in `plenum run --csv`. */
export function traceBranchesCsv(r: TraceResult): string {
  const names: string[] = [];
  for (const b of r.branches) for (const n of b.chambers) if (!names.includes(n)) names.push(n);
  const u = r.parameter.unit ? ` [${r.parameter.unit}]` : '';
  const head = ['branch', 'point', `${r.parameter.vary}${u}`, 'special', 'stable', 'growth_rate [1/s]',
    ...names.flatMap((n) => [`${n}.gauge [Pa]`, `${n}.volume [m^3]`, `${n}.stretch [-]`, `${n}.mass [kg]`])];
  const rows = [head.join(',')];
  const num = (x: number | null | undefined): string => (x === null || x === undefined || !Number.isFinite(x) ? '' : String(x));
  for (const b of r.branches) {
    b.points.forEach((p, k) => {
      rows.push([
        String(b.id), String(k), num(p.parameter), p.special ?? '', p.stable ? '1' : '0', num(p.growth_rate),
        ...names.flatMap((n) => {
          const c = p.chambers[n];
          return c ? [num(c.gauge), num(c.volume), num(c.stretch), num(c.mass)] : ['', '', '', ''];
        }),
      ].join(','));
    });
  }
  return rows.join('\n') + '\n';
}
