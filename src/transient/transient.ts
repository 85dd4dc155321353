/**
 * The main job: integrate a model in time and summarise what happened.
 */
import type { Model } from '../model/types.js';
import { NetworkSystem } from '../assemble/system.js';
import { drive } from '../solve/driver.js';
import { rosenbrock } from '../solve/rosenbrock.js';
import { odex } from '../solve/odex.js';
import type { Integrator } from '../solve/types.js';
import { display } from '../units/display.js';
import { ExpectationMonitor } from './expectations.js';
import { diagnoseFault } from './fault.js';
import type { ChamberSummary, LineSummary, RunFault, RunResult, ValveSummary } from './results.js';
import { spectralRadiusEstimate, STIFF_THRESHOLD } from './stiffness.js';
import { classifyOutcomes } from './outcome.js';

export interface SimulateOptions {
  /** Polled every step; return a message to stop (e.g. on Ctrl-C). */
  interrupt?: () => string | null;
  /** Called now and then with the simulated time reached. */
  progress?: (t: number, tEnd: number) => void;
}

/**
 * Step budget when the netlist sets no `max-steps`, so that no run goes on for ever.
 * Generous: the example networks take a few thousand steps.
 */
const DEFAULT_MAX_STEPS = 1_000_000;
/** Number of samples when the netlist gives no `sample`. */
const DEFAULT_SAMPLES = 1000;
/** Relative mass drift above which a run warns (the integrators conserve mass to round-off). */
const DRIFT_WARN = 1e-9;

/**
 * Laminar lines neglect the gas's acceleration (physics/line-flow.ts); a run warns when the
 * neglected term exceeds this fraction of the friction term (the flow is then high by about half
 * of it).
 */
const ACCEL_WARN = 0.05;

/** The system's event log and the lines' choking changes, in time order (stable). */
function mergeEvents(log: readonly { t: number; what: string }[], more: readonly { t: number; what: string }[]): { t: number; what: string }[] {
  const all = log.map((e) => ({ t: e.t, what: e.what }));
  if (more.length === 0) return all;
  return all.concat(more).map((e, k) => ({ e, k })).sort((a, b) => a.e.t - b.e.t || a.k - b.k).map((x) => x.e);
}

function regimeOf(re: number): LineSummary['regime'] {
  return re < 2300 ? 'laminar' : re > 4000 ? 'turbulent' : 'transitional';
}

export function chooseMethod(model: Model, sys: NetworkSystem, y0: Float64Array): { integrator: Integrator; name: string; why: string } {
  const m = model.simulate.method;
  if (m === 'explicit') return { integrator: odex, name: 'odex', why: 'method: explicit' };
  if (m === 'implicit') return { integrator: rosenbrock, name: 'rodas', why: 'method: implicit' };
  const rho = spectralRadiusEstimate(sys, 0, y0);
  const stiff = !(rho * model.simulate.duration <= STIFF_THRESHOLD);
  return stiff
    ? { integrator: rosenbrock, name: 'rodas', why: `auto: stiff (ρ(J)·duration ≈ ${rho * model.simulate.duration > 1e6 ? (rho * model.simulate.duration).toExponential(1) : Math.round(rho * model.simulate.duration)})` }
    : { integrator: odex, name: 'odex', why: `auto: non-stiff (ρ(J)·duration ≈ ${Math.round(rho * model.simulate.duration)})` };
}

export function simulate(model: Model, options: SimulateOptions = {}): RunResult {
  const started = Date.now();
  const sys = new NetworkSystem(model);
  const y0 = sys.initialState();
  sys.settleInitialModes(0, y0);
  const { integrator, name: chosen } = chooseMethod(model, sys, y0);
  const duration = model.simulate.duration;
  const sample = model.simulate.sample ?? duration / DEFAULT_SAMPLES;
  const channels = sys.channels();
  const nch = channels.length;
  const keys = new Map(channels.map((c, i) => [c.key, i] as const));
  const trace = { channels, times: [] as number[], values: channels.map(() => [] as number[]) };
  // expectations are judged on the dense output inside every step, not on samples
  const monitor = new ExpectationMonitor(model.expect, { keys, width: nch, n: sys.n, observe: (t, y, row) => sys.observe(t, y, row) },
    model.chambers.map((c) => c.name), model.pa);
  const nc = model.chambers.length;
  const nb = model.branches.length;
  const peak = model.chambers.map(() => ({ max: -Infinity, tMax: 0, min: Infinity, tMin: 0 }));
  const bPeak = model.branches.map(() => ({ flow: 0, re: 0, choked: false, lineChoked: false, mach: 0, accel: 0, tAccel: 0 }));
  // lines choking: detected at step ends and samples (the time is that of the first step end or
  // sample at which the new state is seen, so within one step of the change)
  const lineChokedNow = new Uint8Array(nb);
  const chokeLog: { t: number; what: string }[] = [];
  const lineNames = model.branches.map((b) => (b.kind === 'line' ? b.name : b.hostLine));
  const gaugeCol = model.chambers.map((c) => keys.get(`${c.name}.gauge`)!);
  let lastProgress = 0;

  const row = new Float64Array(nch);
  const observe = (t: number, y: Float64Array, kind: 'sample' | 'step'): void => {
    sys.observe(t, y, row);
    if (kind === 'sample') {
      trace.times.push(t);
      for (let c = 0; c < nch; c++) trace.values[c].push(row[c]);
    }
    for (let i = 0; i < nc; i++) {
      const g = row[gaugeCol[i]];
      const pk = peak[i];
      if (g > pk.max) { pk.max = g; pk.tMax = t; }
      if (g < pk.min) { pk.min = g; pk.tMin = t; }
    }
    for (let b = 0; b < nb; b++) {
      const f = sys.flows[b];
      const bp = bPeak[b];
      if (Math.abs(f.mdot) > Math.abs(bp.flow)) bp.flow = f.mdot;
      if (f.reynolds > bp.re) bp.re = f.reynolds;
      if (f.choked) bp.choked = true;
      if (f.lineChoked) bp.lineChoked = true;
      if (f.mach > bp.mach) bp.mach = f.mach;
      if (f.regime === 'laminar' && f.accel > bp.accel) { bp.accel = f.accel; bp.tAccel = t; }
      const ln = lineNames[b];
      if (ln && (f.lineChoked ? 1 : 0) !== lineChokedNow[b]) {
        lineChokedNow[b] = f.lineChoked ? 1 : 0;
        chokeLog.push({ t, what: `line ${ln} ${f.lineChoked ? 'starts' : 'stops'} choking` });
      }
    }
    if (options.progress && Date.now() - lastProgress > 100) {
      lastProgress = Date.now();
      options.progress(t, duration);
    }
  };

  const r = drive(sys, {
    integrator, t0: 0,
    // auto: an explicit start hands over to the stiff method if it meets a kink it cannot pass
    fallback: model.simulate.method === 'auto' && integrator === odex ? rosenbrock : undefined,
    tEnd: duration, y0, sample, observe,
    onStep: monitor.needsSteps ? monitor.step : undefined,
    maxSteps: model.simulate.maxSteps ?? DEFAULT_MAX_STEPS,
    maxWallMs: model.simulate.maxWall !== undefined ? model.simulate.maxWall * 1000 : undefined,
    interrupt: options.interrupt,
  });
  const method = r.switchedAt !== undefined ? `${chosen}, then rodas from t = ${+r.switchedAt.toPrecision(6)} s` : chosen;

  let message = r.message;
  let fault: RunFault | undefined;
  if (r.status === 'failed') {
    // sys.fault still holds what the integrator's last evaluation (usually a rejected trial) saw
    fault = diagnoseFault(sys, model, r.cause as RunFault['cause'], r.t, r.y, sys.fault, r.work, method);
    const base = r.cause === 'budget-steps' && model.simulate.maxSteps === undefined
      ? `the default step budget of ${DEFAULT_MAX_STEPS} steps was used up at t = ${r.t.toPrecision(6)} s (set \`max-steps\` in \`simulate\` to change it)`
      : r.message;
    message = `${base}: ${fault.likely}`;
  }

  // final values and summaries
  const yEnd = r.y;
  const rowEnd = new Float64Array(nch);
  sys.observe(r.t, yEnd, rowEnd);
  const chambers: Record<string, ChamberSummary> = {};
  model.chambers.forEach((c, i) => {
    const g = (q: string): number => rowEnd[keys.get(`${c.name}.${q}`)!];
    const fin: ChamberSummary['final'] = {
      pressure: g('pressure'), gauge: g('gauge'), volume: g('volume'), mass: g('mass'), temperature: g('temperature'),
    };
    if (c.wall.sphere) fin.stretch = g('stretch');
    chambers[c.name] = { final: fin, peak: { gauge: peak[i].max, at: peak[i].tMax }, least: { gauge: peak[i].min, at: peak[i].tMin } };
  });
  const lines: Record<string, LineSummary> = {};
  const valves: Record<string, ValveSummary> = {};
  model.branches.forEach((b, i) => {
    const lineName = b.kind === 'line' ? b.name : b.hostLine;
    if (lineName) {
      lines[lineName] = {
        peak_flow: bPeak[i].flow, peak_reynolds: bPeak[i].re, regime: regimeOf(bPeak[i].re),
        choked: bPeak[i].lineChoked, peak_mach: bPeak[i].mach,
      };
    }
    if (b.kind === 'valve') valves[b.name] = { peak_flow: bPeak[i].flow, choked: bPeak[i].choked };
  });
  const initial = model.chambers.reduce((s, c) => s + c.m0, 0);
  const final = sys.totalMass(yEnd);
  const through = sys.boundaryInflow(yEnd);
  const drift = (final - initial - through) / initial;

  const warnings: string[] = [];
  const seen = new Set<string>();
  for (const e of sys.log) {
    if ((e.kind === 'limit-pressure' || e.kind === 'limit-stretch') && !seen.has(e.what)) {
      seen.add(e.what);
      warnings.push(`${e.what} at t = ${display(e.t, 'time')}: it may burst or yield; see the safety notes`);
    }
  }
  if (Math.abs(drift) > DRIFT_WARN) warnings.push(`mass balance drift ${drift.toExponential(2)} exceeds ${DRIFT_WARN}: results may be inaccurate`);
  model.branches.forEach((b, i) => {
    const a = bPeak[i].accel;
    if (lineNames[i] && a > ACCEL_WARN) {
      warnings.push(`line ${lineNames[i]}: laminar flow, where the gas's acceleration is neglected (compressible Hagen–Poiseuille law); the neglected term reached ${(100 * a).toPrecision(2)} % of the friction term at t = ${display(bPeak[i].tAccel, 'time')}, so the flow there is high by about ${(50 * a).toPrecision(2)} %`);
    }
  });
  model.chambers.forEach((c, i) => {
    if (peak[i].min + model.pa < 0.05 * model.pa) warnings.push(`${c.name} fell to ${display(peak[i].min + model.pa, 'pressure')}, near vacuum`);
  });

  const expectations = r.status === 'completed'
    ? monitor.results(r.t, yEnd)
    : [];

  return {
    format: 1,
    title: model.doc.title,
    file: model.doc.file,
    status: r.status,
    message,
    end: r.t,
    stats: { method, steps: r.work.steps, rejected: r.work.rejected, rhs: r.work.rhs, jacobians: r.work.jacobians, lu: r.work.lu, wall_ms: Date.now() - started },
    chambers, lines, valves,
    mass: { initial, final, through_boundaries: through, drift },
    events: mergeEvents(sys.log, chokeLog),
    warnings,
    expectations,
    ...(fault ? { fault } : {}),
    outcomes: classifyOutcomes(model, trace, sys.log),
    trace,
    ambient: model.pa,
  };
}
