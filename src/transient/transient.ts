/**
 * The main job: integrate a model in time and summarise what happened.
 */
import type { Model } from '../model/types.js';
import { NetworkSystem } from '../assemble/system.js';
import { drive, type EventChatter } from '../solve/driver.js';
import { bdf } from '../solve/bdf.js';
import { rosenbrock } from '../solve/rosenbrock.js';
import { odex } from '../solve/odex.js';
import type { Integrator } from '../solve/types.js';
import { display } from '../units/display.js';
import { MAX_GAS_PRESSURE } from '../units/pressure.js';
import { ExpectationMonitor } from './expectations.js';
import { TimeProbe, type ProbeRequest } from './probe-times.js';
import { diagnoseFault } from './fault.js';
import type { ChamberSummary, ElementSections, EventTally, LineSummary, RunFault, RunResult, ValveSummary } from './results.js';
import { spectralRadiusEstimate, STIFF_THRESHOLD } from './stiffness.js';
import { classifyOutcomes } from './outcome.js';
import { outcomeKeys, SampleStore, type Recorded } from './samples.js';

export interface SimulateOptions {
  /** Polled every step; return a message to stop (e.g. on Ctrl-C). */
  interrupt?: () => string | null;
  /** Called now and then with the simulated time reached. */
  progress?: (t: number, tEnd: number) => void;
  /**
   * Which channels the trace records (samples.ts): 'all' (default), or 'outcomes' when the
   * trace itself is not wanted (only what the outcome classification and the studies read).
   */
  record?: Recorded;
  /**
   * Receives the sampled history as it is taken (e.g. to stream the CSV to disk): `begin` once
   * with the channels, then `sample` at every sample time with the channel values.
   */
  samples?: { begin(channels: readonly { key: string; unit: string }[]): void; sample(t: number, row: Float64Array): void };
  /** Channels to read at given times on the dense output (calibration); see RunResult.probed. */
  probe?: ProbeRequest;
  /**
   * The stiff integrator of `method: implicit` and of a stiff `auto`: 'rodas' (default; the
   * Rosenbrock method, src/solve/rosenbrock.ts) or 'bdf' (the NDF/BDF multistep method keeping
   * its jacobian, src/solve/bdf.ts; measured against RODAS in docs/performance.md, "Stiff
   * integrators": not a clear win at equal accuracy, so not the default). `stats.method`
   * names the one used.
   */
  stiff?: StiffIntegrator;
}

export type StiffIntegrator = 'bdf' | 'rodas';
const STIFF: Record<StiffIntegrator, Integrator> = { bdf, rodas: rosenbrock };

/**
 * Step budget when the netlist sets no `max-steps`, so that no run goes on for ever.
 * Generous: the example networks take a few thousand steps.
 */
const DEFAULT_MAX_STEPS = 1_000_000;
/** Number of samples when the netlist gives no `sample`. */
const DEFAULT_SAMPLES = 1000;
/** Relative mass drift above which a run warns (the integrators conserve mass to round-off). */
const DRIFT_WARN = 1e-9;

/** The run log and the changes summaries saw, in time order (stable: the log first at equal times). */
function mergeSeen(log: readonly { t: number; what: string }[], seen: { t: number; what: string }[]): { t: number; what: string }[] {
  const all = log.map((e) => ({ t: e.t, what: e.what }));
  if (seen.length === 0) return all;
  return all.concat(seen).map((e, k) => ({ e, k })).sort((a, b) => a.e.t - b.e.t || a.k - b.k).map((x) => x.e);
}

/**
 * The integrator of a run: the netlist's `method`, and for `auto` the stiffness estimate; the
 * stiff one is `stiff` (measured against each other: docs/performance.md, "Stiff integrators").
 */
export function chooseMethod(model: Model, sys: NetworkSystem, y0: Float64Array, stiff: StiffIntegrator = 'rodas'): { integrator: Integrator; name: string; why: string } {
  const m = model.simulate.method;
  if (m === 'explicit') return { integrator: odex, name: 'odex', why: 'method: explicit' };
  if (m === 'implicit') return { integrator: STIFF[stiff], name: stiff, why: 'method: implicit' };
  const rho = spectralRadiusEstimate(sys, 0, y0);
  const isStiff = !(rho * model.simulate.duration <= STIFF_THRESHOLD);
  return isStiff
    ? { integrator: STIFF[stiff], name: stiff, why: `auto: stiff (ρ(J)·duration ≈ ${rho * model.simulate.duration > 1e6 ? (rho * model.simulate.duration).toExponential(1) : Math.round(rho * model.simulate.duration)})` }
    : { integrator: odex, name: 'odex', why: `auto: non-stiff (ρ(J)·duration ≈ ${Math.round(rho * model.simulate.duration)})` };
}

/** A log-only event that chattered, in words: which element, which crossing, how often, when. */
function chatterWarning(sys: NetworkSystem, c: EventChatter): string {
  const e = sys.events[c.k];
  // the wording the event logged last (e.g. `pod passes its pressure minimum (1.2 kPa gauge)`)
  const said = sys.log.counts().filter((n) => n.element === e.element && n.kind === e.kind).pop()?.what ?? `${e.element} ${e.kind}`;
  return `${e.element} chatters: \`${said}\` ${c.count} more times between t = ${display(c.from, 'time')} and ${display(c.to, 'time')}, not logged one by one (the state hovers at the crossing)`;
}

/** Event counts by element and kind (the wording merged), in order of first occurrence. */
function tallyByElement(counts: readonly { element: string; kind: string; count: number; first: number; last: number }[]): EventTally[] {
  const by = new Map<string, EventTally>();
  for (const c of counts) {
    const key = `${c.element}\u0000${c.kind}`;
    const t = by.get(key);
    if (!t) by.set(key, { element: c.element, kind: c.kind, count: c.count, first: c.first, last: c.last });
    else { t.count += c.count; t.first = Math.min(t.first, c.first); t.last = Math.max(t.last, c.last); }
  }
  return [...by.values()];
}

export function simulate(model: Model, options: SimulateOptions = {}): RunResult {
  const started = Date.now();
  const sys = new NetworkSystem(model);
  const y0 = sys.initialState();
  const initialMass = sys.totalMass(y0); // the chambers' gas, and any held by wave lines
  sys.settleInitialModes(0, y0);
  const { integrator, name: chosen } = chooseMethod(model, sys, y0, options.stiff);
  const duration = model.simulate.duration;
  const sample = model.simulate.sample ?? duration / DEFAULT_SAMPLES;
  const channels = sys.channels();
  const nch = channels.length;
  options.samples?.begin(channels);
  const keys = new Map(channels.map((c, i) => [c.key, i] as const));
  const keys0 = options.record === 'outcomes' ? outcomeKeys(model.chambers.map((c) => c.name)) : undefined;
  const samples = new SampleStore(channels, duration / sample + 2, keys0 ? (k) => keys0.has(k) : () => true);
  // expectations are judged on the dense output inside every step, not on samples
  const monitor = new ExpectationMonitor(model.expect, { keys, width: nch, n: sys.n, observe: (t, y, row) => sys.observe(t, y, row) },
    model.chambers.map((c) => c.name), model.pa);
  const probe = options.probe ? new TimeProbe(options.probe, { keys, width: nch, n: sys.n, observe: (t, y, row) => sys.observe(t, y, row) }) : undefined;
  const onStep = probe && monitor.needsSteps
    ? (a: number, b: number, d: Parameters<typeof monitor.step>[2]): void => { monitor.step(a, b, d); probe.step(a, b, d); }
    : probe ? probe.step : monitor.needsSteps ? monitor.step : undefined;
  // every element's summaries (peaks, finals), tracked at samples and step ends
  const summaries = sys.elements.flatMap((e) => e.summaries?.((key) => keys.get(key)!) ?? []);
  let lastProgress = 0;

  const chatter: EventChatter[] = [];
  const row = new Float64Array(nch);
  const observe = (t: number, y: Float64Array, kind: 'sample' | 'step'): void => {
    sys.observe(t, y, row);
    if (kind === 'sample') {
      samples.add(t, row);
      options.samples?.sample(t, row);
    }
    for (let s = 0; s < summaries.length; s++) summaries[s].track(t, row);
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
    onStep,
    maxSteps: model.simulate.maxSteps ?? DEFAULT_MAX_STEPS,
    maxWallMs: model.simulate.maxWall !== undefined ? model.simulate.maxWall * 1000 : undefined,
    wallStart: started,
    interrupt: options.interrupt,
    onChatter: (c) => { chatter.push(c); },
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
  const sections: ElementSections = {};
  const rows: NonNullable<RunResult['rows']> = {};
  for (const s of summaries) {
    const res = (sections[s.section] ??= {})[s.name] = s.result(rowEnd);
    if (s.row) (rows[s.section] ??= {})[s.name] = s.row(res);
  }
  const { chambers = {}, lines = {}, valves = {}, ...more } = sections;
  const initial = initialMass;
  const final = sys.totalMass(yEnd);
  const through = sys.boundaryInflow(yEnd);
  // relative to the larger of the gas held at the start and the gas that came in or left: a
  // feed into a nearly empty chamber made the start mass alone a divisor near zero (drift ∞)
  const scale = Math.max(initial, Math.abs(through));
  const drift = scale > 0 ? (final - initial - through) / scale : 0;

  const warnings: string[] = [];
  const counts = sys.log.counts();
  for (const c of counts) {
    if (c.warning) {
      warnings.push(`${c.what} at t = ${display(c.first, 'time')}: it may burst or yield; see the safety notes`);
    }
  }
  for (const c of chatter) warnings.push(chatterWarning(sys, c));
  if (Math.abs(drift) > DRIFT_WARN) warnings.push(`mass balance drift ${drift.toExponential(2)} exceeds ${DRIFT_WARN}: results may be inaccurate`);
  for (const s of summaries) if (s.warnings) warnings.push(...s.warnings());
  // a pressure past any physical range (a runaway supply expression, a stiff wall squeezed):
  // the run completes, but its numbers mean nothing, and it must not pass silently
  for (const [name, c] of Object.entries(chambers as unknown as Record<string, ChamberSummary>)) {
    const peak = c.peak.gauge + model.pa;
    if (!(peak <= MAX_GAS_PRESSURE)) {
      warnings.push(`${name} reached ${Number.isFinite(peak) ? `${peak.toExponential(2)} Pa absolute` : 'a pressure that is not a finite number'} at t = ${display(c.peak.at, 'time')}, above ${MAX_GAS_PRESSURE / 1e6} MPa: past the range of plenum's gas and wall laws, so the results are not physical; check the supply pressures, the units and the wall parameters`);
    }
  }

  const trace = samples.trace();
  const expectations = r.status === 'completed'
    ? monitor.results(r.t, yEnd)
    : [];

  return {
    format: 1,
    title: model.doc.title,
    ...(model.doc.description !== undefined ? { description: model.doc.description } : {}),
    file: model.doc.file,
    status: r.status,
    message,
    end: r.t,
    stats: { method, steps: r.work.steps, rejected: r.work.rejected, rhs: r.work.rhs, jacobians: r.work.jacobians, lu: r.work.lu, wall_ms: Date.now() - started },
    chambers: chambers as unknown as Record<string, ChamberSummary>,
    lines: lines as unknown as Record<string, LineSummary>,
    valves: valves as unknown as Record<string, ValveSummary>,
    ...(Object.keys(more).length ? { sections: more } : {}),
    ...(Object.keys(rows).length ? { rows } : {}),
    mass: { initial, final, through_boundaries: through, drift },
    events: mergeSeen(sys.log.entries(), summaries.flatMap((s) => s.seen?.() ?? [])),
    ...(sys.log.omitted > 0 ? { events_omitted: sys.log.omitted, event_counts: tallyByElement(counts) } : {}),
    warnings,
    expectations,
    ...(fault ? { fault } : {}),
    outcomes: classifyOutcomes(model, trace, sys.log.entries(), sys.log.omitted > 0 ? counts : undefined),
    trace,
    ...(probe ? { probed: probe.values } : {}),
    ambient: model.pa,
  };
}
