/**
 * One case of a study: apply its overrides to the parsed netlist, check and build it like a
 * user's netlist, simulate, and boil the run down to its outcome. Runs in a worker thread or in the
 * main thread; the result depends only on the netlist text and the case's parameters.
 */
import { formatDiagnostic, type Diagnostic } from '../diag/diagnostic.js';
import { buildModel } from '../model/build.js';
import type { Model } from '../model/types.js';
import { mapOverrideDiagnostics, overrideValue, readWithOverrides, splitPath, type Override } from '../netlist/override.js';
import { readNetlistTree } from '../netlist/read.js';
import { parseYamlTree } from '../netlist/yaml-tree.js';
import type { YamlTree } from '../netlist/yaml-types.js';
import { cylinderSummary, type RunResult } from '../transient/results.js';
import type { CaseSpec, ParamValue } from './sweep-spec.js';
import { simulate } from '../transient/transient.js';

/** Chambers whose final volumes lie within this fraction of the largest all count as largest. */
export const LARGEST_TIE = 1e-3;
/** Fallback outcome when a run carries no classification: settled when every chamber's gauge... */
const SETTLE_BAND = 0.01;
/** ...stays within this band of its final value (or within this many pascals near zero gauge)... */
const SETTLE_FLOOR_PA = 10;
/** ...over this last fraction of the duration; `moving` otherwise. */
const SETTLE_TAIL = 0.1;

export type CaseStatus = 'completed' | 'failed' | 'invalid';

export interface ChamberOutcome {
  /** Final gauge pressure, Pa. */
  gauge: number;
  /** Final wall volume, m³. */
  volume: number;
  /** Final stretch (spheres), else null. */
  stretch: number | null;
  /** Largest gauge pressure over the run, Pa. */
  peak_gauge: number;
}

/** What a sweep reports of each cylinder (SI). */
export interface CylinderOutcome {
  /** Final position, m. */
  position: number;
  /** Largest speed, m/s. */
  peak_speed: number;
  /** The first completed stroke's duration, s, or null. */
  stroke_time: number | null;
  /** Largest impact speed at a stop, m/s, or null when it never reached one. */
  impact_speed: number | null;
}

export interface CaseResult {
  index: number;
  group: number;
  params: ParamValue[];
  status: CaseStatus;
  message: string;
  /** Chamber(s) with the largest final volume, tied ones joined by `=`; null unless completed. */
  largest: string | null;
  /**
   * How the run ends (analysis/outcome.ts): `settled`, `moving`, `diverging` or `oscillating`;
   * when groups of chambers end differently, each group as `a+b: settled; c: moving`. Null
   * unless completed.
   */
  outcome: string | null;
  /** When every group settled: the latest settling time, s; else null. */
  settling_time: number | null;
  expectations: { name: string; passed: boolean; actual: number }[];
  chambers: Record<string, ChamberOutcome>;
  /** Present when the netlist has cylinders. */
  cylinders?: Record<string, CylinderOutcome>;
  /** (final − initial − inflow)/initial, the run's mass balance. */
  mass_drift: number | null;
  /** Warnings of this case that the unmodified netlist does not have (limits exceeded, ...). */
  warnings: string[];
}

function overridesOf(params: readonly ParamValue[]): Override[] {
  return params.map((p) => ({ path: splitPath(p.path), value: overrideValue(p.text), label: `${p.path} = ${p.text}` }));
}

function diagKey(d: Diagnostic): string {
  return `${d.code}|${d.path.join('.')}`;
}

/** Chamber(s) with the largest final volume: all within LARGEST_TIE of the largest, joined by `=`. */
export function largestChamber(chambers: Record<string, { volume: number }>): string | null {
  const names = Object.keys(chambers);
  const vmax = Math.max(...names.map((n) => chambers[n].volume));
  if (!names.length || !Number.isFinite(vmax)) return null;
  return names.filter((n) => chambers[n].volume >= vmax * (1 - LARGEST_TIE)).join('=');
}

/** Fallback when a run has no outcome classification: every gauge within its band over the tail. */
function hasSettled(r: RunResult, names: string[]): boolean {
  const t0 = r.end * (1 - SETTLE_TAIL);
  const times = r.trace.times;
  for (const name of names) {
    const c = r.trace.channels.findIndex((ch) => ch.key === `${name}.gauge`);
    const v = r.trace.values[c];
    const final = r.chambers[name].final.gauge;
    const band = Math.max(SETTLE_BAND * Math.abs(final), SETTLE_FLOOR_PA);
    for (let k = 0; k < times.length; k++) if (times[k] >= t0 && Math.abs(v[k] - final) > band) return false;
  }
  return true;
}

/** The run's outcome label and settling time, from its per-group classification. */
export function outcomeOf(r: RunResult, names: string[]): { outcome: string; settling_time: number | null } {
  const groups = r.outcomes;
  if (!groups || !groups.length) {
    const settled = hasSettled(r, names);
    return { outcome: settled ? 'settled' : 'moving', settling_time: null };
  }
  const kinds = new Set(groups.map((g) => g.outcome));
  const outcome = kinds.size === 1 ? groups[0].outcome : groups.map((g) => `${g.chambers.join('+')}: ${g.outcome}`).join('; ');
  const allSettled = groups.every((g) => g.outcome === 'settled' && g.settling_time !== null);
  return { outcome, settling_time: allSettled ? Math.max(...groups.map((g) => g.settling_time as number)) : null };
}

/** What a case reports when it could not even be read or built. */
function invalid(spec: CaseSpec, diagnostics: readonly Diagnostic[]): CaseResult {
  const errors = diagnostics.filter((d) => d.severity === 'error');
  return {
    index: spec.index, group: spec.group, params: spec.params, status: 'invalid',
    message: errors.map(formatDiagnostic).join('\n'),
    largest: null, outcome: null, settling_time: null, expectations: [], chambers: {}, mass_drift: null, warnings: [],
  };
}

/** The run of one case. Reuse one CaseRunner for many cases of the same netlist. */
export class CaseRunner {
  private readonly baseWarnings: Set<string>;
  /** The netlist parsed once; each case sets its overrides in a copy-on-write edit of it. */
  private readonly tree: YamlTree;

  constructor(
    readonly source: string,
    readonly file: string,
  ) {
    this.tree = parseYamlTree(source, file);
    const base = readNetlistTree(this.tree, source, file);
    const warnings = base.ok ? [...base.warnings] : [];
    if (base.ok) {
      const m = buildModel(base.value);
      if (m.ok) warnings.push(...m.warnings);
    }
    this.baseWarnings = new Set(warnings.map(diagKey));
  }

  /** Reads and builds the netlist with the case's overrides; diagnostics map back to the overrides. */
  model(params: readonly ParamValue[]): { ok: true; model: Model; warnings: Diagnostic[] } | { ok: false; diagnostics: Diagnostic[] } {
    const overrides = overridesOf(params);
    const doc = readWithOverrides(this.source, this.file, overrides, this.tree);
    if (!doc.ok) return { ok: false, diagnostics: doc.diagnostics };
    const built = buildModel(doc.value);
    if (!built.ok) return { ok: false, diagnostics: mapOverrideDiagnostics(built.diagnostics, this.source, this.file, overrides) };
    const warnings = [...doc.warnings, ...mapOverrideDiagnostics(built.warnings, this.source, this.file, overrides)];
    return { ok: true, model: built.value, warnings: warnings.filter((w) => !this.baseWarnings.has(diagKey(w))) };
  }

  run(spec: CaseSpec): CaseResult {
    const m = this.model(spec.params);
    if (!m.ok) return invalid(spec, m.diagnostics);
    const model = m.model;
    const r = simulate(model, { record: 'outcomes' }); // a case keeps its outcome, not its trace
    const completed = r.status === 'completed';
    const chambers: Record<string, ChamberOutcome> = {};
    if (completed) {
      for (const c of model.chambers) {
        const s = r.chambers[c.name];
        chambers[c.name] = { gauge: s.final.gauge, volume: s.final.volume, stretch: s.final.stretch ?? null, peak_gauge: s.peak.gauge };
      }
    }
    const cylinders: Record<string, CylinderOutcome> = {};
    if (completed) {
      for (const c of model.cylinders) {
        const s = cylinderSummary(r, c.name);
        if (!s) continue;
        cylinders[c.name] = {
          position: s.final.position, peak_speed: Math.abs(s.peak.velocity), stroke_time: s.stroke_time,
          impact_speed: s.impacts.length ? Math.max(...s.impacts.map((i) => Math.abs(i.velocity))) : null,
        };
      }
    }
    const names = model.chambers.map((c) => c.name);
    const end = completed ? outcomeOf(r, names) : { outcome: null, settling_time: null };
    return {
      index: spec.index, group: spec.group, params: spec.params,
      status: r.status,
      message: r.message,
      largest: completed ? largestChamber(chambers) : null,
      outcome: end.outcome,
      settling_time: end.settling_time,
      expectations: r.expectations.map((e) => ({ name: e.name, passed: e.passed, actual: e.actual })),
      chambers,
      ...(model.cylinders.length ? { cylinders } : {}),
      mass_drift: r.mass.drift,
      warnings: [...m.warnings.map(formatDiagnostic), ...r.warnings],
    };
  }
}
