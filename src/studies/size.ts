/**
 * Sizing: values of free parameters for which every expectation of the netlist passes with a
 * stated margin (margins.ts: each expectation's signed distance to its limit, normalised), for
 * the worst case over optional tolerances (size-robust.ts).
 *
 * The constraint is g(p) = min over expectations and tolerance cases of margin − X ≥ 0.
 *
 * One free parameter: the feasible boundary. The ends of the range are evaluated; the search
 * looks for the smallest feasible value (`minimise`, the default: the smallest valve, the
 * thinnest line) or the largest (`maximise`). If the wanted end is infeasible and the other
 * end is not, the boundary is bracketed between them; if both fail, nine interior points are
 * tried. The bracket is then narrowed by bisection on pass/fail (g ≥ 0), several points per
 * round when workers are free (k-section), until it is narrower than 1e-6 of the value. The
 * reported value is the bracket's feasible end.
 *
 * Several free parameters: compass (pattern) search on the box scaled to [0, 1]^n with the
 * extreme-barrier treatment of the constraint (an infeasible trial counts as +∞), polling the
 * 2n coordinate directions in parallel, halving the step when no poll point improves, down to
 * 1e-4 of the range. Phase one maximises g from the start values until it is ≥ 0 (without an
 * objective it continues to the design with the largest worst margin, the most robust one);
 * phase two minimises (or maximises) the objective parameter among feasible points. Compass
 * search can stop at a corner of the feasible set that is not optimal when constraints cross
 * at a sharp angle; the result is then still feasible, and the report says which expectation
 * binds. References: T. G. Kolda, R. M. Lewis & V. Torczon, "Optimization by direct search:
 * new perspectives on some classical and modern methods", SIAM Review 45 (2003) 385–482,
 * §2.1 and §8 (compass search; the barrier approach to constraints); C. Audet & J. E. Dennis,
 * "Mesh adaptive direct search algorithms for constrained optimization", SIAM J. Optim. 17
 * (2006) 188–217 (extreme barrier).
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { buildModel } from '../model/build.js';
import { readNetlist } from '../netlist/read.js';
import { EvalPool } from './eval-pool.js';
import type { EvalResult, PathValue } from './evaluate.js';
import { paramText, parseFree, startValue, type FreeParam } from './free-params.js';
import { cornerCases, MAX_CORNER_PARAMS, parseTolerance, perturbed, sampleCases, type RobustCase, type Tolerance } from './size-robust.js';
import { defaultJobs } from './sweep-pool.js';
import { wilson } from './sweep-stats.js';

/** Bisection stops when the bracket is narrower than this fraction of the value. */
const BRACKET_REL = 1e-6;
/** Pattern search stops when the step is below this fraction of the range. */
const STEP_MIN = 1e-4;
/** Interior points tried when both ends of a one-parameter range fail. */
const SCAN_POINTS = 9;
const MAX_POLLS = 400;
/** Notes of a non-interval feasible set listed at most. */
const MAX_NOTES = 3;

export interface SizeOptions {
  source: string;
  file: string;
  /** `PATH=LOW..HIGH`. */
  free: string[];
  minimise?: string;
  maximise?: string;
  /** Fraction by which every expectation must clear its limit (default 0). */
  margin?: number;
  /** `PATH±TOL`. */
  robust?: string[];
  /** Monte Carlo draws instead of corners. */
  samples?: number;
  seed?: number;
  jobs?: number;
  progress?: (simulations: number, what: string) => void;
  worker?: URL;
}

export interface SizeReport {
  status: 'found' | 'infeasible' | 'failed';
  message: string;
  method: 'boundary' | 'pattern-search';
  parameters: { path: string; value: number; text: string; lo: number; hi: number }[];
  /** The expectation with the smallest (worst-case) margin at the design. */
  binding: string | null;
  /** Worst-case margin of every expectation at the design. */
  margins: Record<string, number>;
  margin: number;
  objective: { path: string; sense: 'minimise' | 'maximise' } | null;
  robust: { mode: 'corners' | 'monte-carlo'; cases: number; passed: number; probability?: { p: number; low: number; high: number }; tolerances: string[] } | null;
  simulations: number;
  notes: string[];
  ambient: number;
}

function fail(message: string, hint: string, file = '--free'): Diagnostic {
  return { code: 'size', severity: 'error', message, file, line: 0, column: 0, path: [], hint };
}

interface Design { g: number; margins: Map<string, number>; passedCases: number; message: string }

export async function size(o: SizeOptions): Promise<Result<SizeReport>> {
  const doc = readNetlist(o.source, o.file);
  if (!doc.ok) return doc;
  const base = buildModel(doc.value);
  if (!base.ok) return base;
  const pa = base.value.pa;
  const names = base.value.expect.map((e) => e.name);
  const errors: Diagnostic[] = [];
  if (!names.length) errors.push(fail('the netlist has no expectations to size for', 'add `expect:` entries (what must hold), e.g. a pressure reached by a time', o.file));
  if (!o.free.length) errors.push(fail('nothing is free', 'give e.g. `--free valves.v1.orifice=0.5 mm..4 mm`'));
  const free: FreeParam[] = [];
  for (const arg of o.free) {
    const p = parseFree(arg, o.source, pa, false);
    if (!p.ok) errors.push(fail(p.message, p.hint));
    else if (free.some((f) => f.path === p.value.path)) errors.push(fail(`\`${p.value.path}\` is free twice`, 'give each path one --free'));
    else free.push(p.value);
  }
  if (o.minimise && o.maximise) errors.push(fail('--minimise and --maximise are both given', 'give one objective', '--minimise'));
  const objPath = o.minimise ?? o.maximise;
  const objIndex = objPath ? free.findIndex((f) => f.path === objPath) : -1;
  if (objPath && objIndex < 0 && !errors.length) errors.push(fail(`the objective \`${objPath}\` is not a free parameter`, `minimise or maximise one of ${free.map((f) => `\`${f.path}\``).join(', ')}`, o.minimise ? '--minimise' : '--maximise'));
  const margin = o.margin ?? 0;
  if (!Number.isFinite(margin) || margin < 0 || margin >= 1) errors.push(fail(`--margin ${o.margin} is not a fraction in [0, 1)`, 'write e.g. `--margin 0.1` (every expectation clears its limit by 10 %)', '--margin'));
  const tols: Tolerance[] = [];
  const tolParams: FreeParam[] = [];
  for (const arg of o.robust ?? []) {
    const t = parseTolerance(arg, o.source);
    if (!t.ok) { errors.push(fail(t.message, t.hint, '--robust')); continue; }
    const own = free.find((f) => f.path === t.value.path);
    const fixed = own ? undefined : parseFree(t.value.path, o.source, pa, true);
    if (fixed && !fixed.ok) { errors.push(fail(fixed.message.replace('--free', '--robust'), fixed.hint, '--robust')); continue; }
    tols.push(t.value);
    tolParams.push(own ?? (fixed as { ok: true; value: FreeParam }).value);
  }
  if (o.samples === undefined && tols.length > MAX_CORNER_PARAMS) errors.push(fail(`${tols.length} tolerances make ${2 ** tols.length} corners`, 'use a Monte Carlo sample: `--samples 200 --seed 1`', '--robust'));
  if (o.samples !== undefined && (!Number.isInteger(o.samples) || o.samples < 1)) errors.push(fail(`--samples ${o.samples} is not a whole number ≥ 1`, 'write e.g. `--samples 200`', '--samples'));
  if (o.samples !== undefined && !tols.length) errors.push(fail('--samples is given but nothing has a tolerance', "add e.g. `--robust 'lines.feed.diameter±0.1 mm'`", '--samples'));
  if (errors.length) return { ok: false, diagnostics: errors };

  const cases: RobustCase[] = !tols.length ? [[]] : o.samples !== undefined ? sampleCases(tols.length, o.samples, o.seed ?? 1) : cornerCases(tols.length);
  const pool = new EvalPool({ source: o.source, file: o.file, experiments: [{ overrides: [] }] }, {
    jobs: o.jobs ?? defaultJobs(), worker: o.worker, progress: (k) => o.progress?.(k, stage),
  });
  let stage = 'checking the ends of the range';
  const n = free.length;
  const jobsFor = (p: number[]): PathValue[][] => cases.map((c) => {
    const values = new Map<string, PathValue>();
    free.forEach((f, j) => values.set(f.path, { path: f.path, text: paramText(f, p[j], pa) }));
    tols.forEach((t, i) => {
      const fp = tolParams[i];
      const j = free.indexOf(fp);
      const centre = j >= 0 ? p[j] : (fp.nominal as number);
      // a relative tolerance of a pressure written gauge is relative to the gauge value
      const v = fp.map.reference === 'gauge' ? perturbed(t, centre - pa, c[i]) + pa : perturbed(t, centre, c[i]);
      values.set(t.path, { path: t.path, text: paramText(fp, v, pa) });
    });
    return [...values.values()];
  });
  const notes: string[] = [];
  const designs = async (ps: number[][]): Promise<Design[]> => {
    const jobs = ps.flatMap((p) => jobsFor(p).map((params) => ({ experiment: 0, params })));
    const res: EvalResult[] = await pool.map(jobs);
    return ps.map((_, k) => {
      const margins = new Map(names.map((nm) => [nm, Infinity] as [string, number]));
      let passedCases = 0;
      let message = '';
      for (let c = 0; c < cases.length; c++) {
        const r = res[k * cases.length + c];
        if (r.status !== 'completed') {
          message = r.message;
          for (const nm of names) margins.set(nm, -Infinity);
          continue;
        }
        let ok = true;
        r.expectations.forEach((e) => {
          margins.set(e.name, Math.min(margins.get(e.name)!, e.margin));
          if (!(e.margin >= margin)) ok = false;
        });
        if (ok) passedCases++;
      }
      const g = Math.min(...margins.values()) - margin;
      return { g, margins, passedCases, message };
    });
  };
  /**
   * Narrows [bad, good] on pass/fail, several points a round when workers are free; returns the
   * feasible end. "Fails" means: one of the expectations that fail at `bad` (the ones that make
   * the boundary) is short of the margin. Another expectation failing inside the bracket, while
   * passing at both ends, means the feasible set is not an interval; that is noted, and the
   * bracket still closes on the boundary of the expectations that define it.
   */
  const bisect = async (bad: { v: number; d: Design }, good: { v: number; d: Design }, at: (v: number) => number[]): Promise<{ v: number; d: Design }> => {
    const defining = names.filter((nm) => !(bad.d.margins.get(nm)! >= margin));
    const gDef = (d: Design): number => Math.min(...defining.map((nm) => d.margins.get(nm)!)) - margin;
    const per = Math.max(1, Math.floor((o.jobs ?? defaultJobs()) / cases.length));
    let lo = bad.v;
    while (Math.abs(good.v - lo) > BRACKET_REL * Math.max(Math.abs(good.v), Math.abs(lo))) {
      const vs = Array.from({ length: per }, (_, i) => lo + ((good.v - lo) * (i + 1)) / (per + 1));
      const ds = await designs(vs.map(at));
      ds.forEach((d, i) => {
        const other = names.filter((nm) => !defining.includes(nm) && !(d.margins.get(nm)! >= margin));
        if (other.length && gDef(d) >= 0 && notes.length < MAX_NOTES) notes.push(`at ${free.map((f, j) => paramText(f, at(vs[i])[j], pa, 6)).join(', ')} \`${other.join('`, `')}\` fails although it passes at both ends of the bracket: the feasible set is not an interval here (a valve that switches or not?); check the design by a sweep`);
      });
      // the first point from the infeasible side that clears the defining expectations
      const i = ds.findIndex((d) => gDef(d) >= 0);
      if (i < 0) lo = vs[per - 1];
      else {
        if (i > 0) lo = vs[i - 1];
        good = { v: vs[i], d: ds[i] };
      }
    }
    return good;
  };
  let best: { p: number[]; d: Design } | undefined;
  let method: SizeReport['method'] = 'boundary';
  try {
    if (n === 1) {
      const f = free[0];
      const want: 'min' | 'max' = o.maximise ? 'max' : 'min';
      const [dl, dh] = await designs([[f.lo], [f.hi]]);
      const [near, far] = want === 'min' ? [{ v: f.lo, d: dl }, { v: f.hi, d: dh }] : [{ v: f.hi, d: dh }, { v: f.lo, d: dl }];
      if (near.d.g >= 0) {
        best = { p: [near.v], d: near.d };
        notes.push(`the ${want === 'min' ? 'lower' : 'upper'} end of the range already passes: the boundary lies outside ${f.path}'s range`);
      } else {
        let feasible: { v: number; d: Design } | undefined = far.d.g >= 0 ? far : undefined;
        if (!feasible) {
          stage = 'looking for a feasible value inside the range';
          const vs = Array.from({ length: SCAN_POINTS }, (_, i) => near.v + ((far.v - near.v) * (i + 1)) / (SCAN_POINTS + 1));
          const ds = await designs(vs.map((v) => [v]));
          const i = ds.findIndex((d) => d.g >= 0);
          if (i >= 0) feasible = { v: vs[i], d: ds[i] };
          else {
            const all = [near, far, ...vs.map((v, j) => ({ v, d: ds[j] }))];
            const top = all.reduce((a, b) => (b.d.g > a.d.g ? b : a));
            best = { p: [top.v], d: top.d };
          }
        }
        if (feasible) {
          stage = 'bisecting on pass/fail';
          const b = await bisect(near, feasible, (v) => [v]);
          best = { p: [b.v], d: b.d };
        }
      }
    } else {
      method = 'pattern-search';
      const u2p = (u: number[]): number[] => u.map((x, j) => free[j].lo + x * (free[j].hi - free[j].lo));
      let u = free.map((f) => (startValue(f) - f.lo) / (f.hi - f.lo));
      let [cur] = await designs([u2p(u)]);
      /** Improvement: a smaller score, or an equal score with a larger g (away from the boundary). */
      const better = (d: Design, sc: number, than: Design, scThan: number): boolean => sc < scThan || (sc === scThan && d.g > than.g);
      const poll = async (score: (d: Design, u: number[]) => number, stop: (d: Design) => boolean): Promise<void> => {
        let step = 0.25;
        let polls = 0;
        while (step >= STEP_MIN && polls++ < MAX_POLLS && !stop(cur)) {
          const trial: number[][] = [];
          for (let j = 0; j < n; j++) for (const s of [1, -1]) {
            const v = u.slice();
            v[j] = Math.min(1, Math.max(0, v[j] + s * step));
            if (v[j] !== u[j]) trial.push(v);
          }
          const ds = await designs(trial.map(u2p));
          let k = -1;
          let bestScore = score(cur, u);
          let bestD = cur;
          ds.forEach((d, i) => { const sc = score(d, trial[i]); if (better(d, sc, bestD, bestScore)) { bestScore = sc; bestD = d; k = i; } });
          if (k >= 0) { u = trial[k]; cur = ds[k]; } else step /= 2;
        }
      };
      stage = 'searching for a design that passes';
      await poll((d) => -d.g, (d) => objIndex >= 0 && d.g >= 0);
      if (objIndex >= 0 && cur.g >= 0) {
        stage = `${o.minimise ? 'minimising' : 'maximising'} ${objPath}`;
        const sense = o.minimise ? 1 : -1;
        await poll((d, v) => (d.g >= 0 ? sense * v[objIndex] : Infinity), () => false);
        // the objective coordinate onto its boundary: bisection from the search's point
        stage = 'bisecting the objective onto the boundary';
        const at = (v: number): number[] => u2p(u.map((x, j) => (j === objIndex ? v : x)));
        const end = o.minimise ? 0 : 1;
        const [dEnd] = await designs([at(end)]);
        const b = dEnd.g >= 0 ? { v: end, d: dEnd } : await bisect({ v: end, d: dEnd }, { v: u[objIndex], d: cur }, at);
        u = u.map((x, j) => (j === objIndex ? b.v : x));
        cur = b.d;
      }
      best = { p: u2p(u), d: cur };
    }
  } finally {
    await pool.close();
  }
  const d = best!.d;
  const found = d.g >= 0;
  const failed = !found && d.message !== '' && [...d.margins.values()].every((v) => v === -Infinity);
  const margins: Record<string, number> = {};
  for (const [k, v] of d.margins) margins[k] = v;
  const binding = names.reduce<string | null>((a, nm) => (a === null || margins[nm] < margins[a] ? nm : a), null);
  const status: SizeReport['status'] = found ? 'found' : failed ? 'failed' : 'infeasible';
  const robust: SizeReport['robust'] = tols.length
    ? {
        mode: o.samples !== undefined ? 'monte-carlo' : 'corners', cases: cases.length, passed: d.passedCases, tolerances: o.robust ?? [],
        ...(o.samples !== undefined ? { probability: (({ p, low, high }) => ({ p, low, high }))(wilson(d.passedCases, cases.length)) } : {}),
      }
    : null;
  const message = status === 'found'
    ? `every expectation passes${margin ? ` with a margin of ${margin}` : ''}${tols.length ? ` in all ${cases.length} tolerance cases` : ''}; ${binding} binds`
    : status === 'failed' ? `the simulations failed: ${d.message}` : `no value in the range makes every expectation pass${margin ? ` with a margin of ${margin}` : ''}; closest: ${binding} (margin ${margins[binding!].toPrecision(3)})`;
  return {
    ok: true,
    value: {
      status, message, method,
      parameters: free.map((f, j) => ({ path: f.path, value: best!.p[j], text: paramText(f, best!.p[j], pa, 6), lo: f.lo, hi: f.hi })),
      binding, margins, margin,
      objective: objPath ? { path: objPath, sense: o.minimise ? 'minimise' : 'maximise' } : n === 1 ? { path: free[0].path, sense: 'minimise' } : null,
      robust, simulations: pool.count, notes, ambient: pa,
    },
    warnings: [],
  };
}
