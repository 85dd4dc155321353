/**
 * Tolerances for robust sizing: `--robust 'PATH±TOL'` (also `+-`), TOL relative (`5%`) or
 * absolute (`0.05 mm`, `10 kPa`). Each toleranced parameter may be free (the tolerance then
 * sits around each trial value: a part made to the chosen size) or fixed (around the netlist's
 * value). The cases a design must pass are either the 2^k corners of the tolerance box or a
 * seeded sample of N uniform draws in it (caseStream(seed, k), the sweep's generator), the
 * same draws for every trial design (common random numbers, so the search sees a
 * deterministic function).
 */
import { caseStream } from './rng.js';
import { readScalar } from '../units/scalar.js';
import { checkPath } from '../netlist/override.js';

/** Corners above this many parameters: use a Monte Carlo sample instead. */
export const MAX_CORNER_PARAMS = 10;

export interface Tolerance {
  path: string;
  /** Relative half-width (fraction of the value), or absolute half-width in SI. */
  rel?: number;
  abs?: number;
}

export type ToleranceRead = { ok: true; value: Tolerance } | { ok: false; message: string; hint: string };

const HINT = "write e.g. `--robust 'lines.feed.diameter±0.1 mm'` or `--robust 'valves.v1.conductance±10%'`";

export function parseTolerance(arg: string, source: string): ToleranceRead {
  const m = /^(.*?)(?:±|\+-|\+\/-)(.*)$/.exec(arg.trim());
  if (!m || !m[1].trim() || !m[2].trim()) return { ok: false, message: `--robust: \`${arg}\` is not PATH±TOL`, hint: HINT };
  const path = m[1].trim();
  const c = checkPath(source, path);
  if (!c.ok) return { ok: false, message: `--robust ${path}: ${c.message}`, hint: c.hint };
  const tol = readScalar(m[2].trim());
  if (!tol.ok) return { ok: false, message: `--robust ${path}: ${tol.message}`, hint: tol.hint };
  if (!(tol.value.si >= 0)) return { ok: false, message: `--robust ${path}: the tolerance must be zero or more`, hint: HINT };
  if (tol.value.reference === 'abs') return { ok: false, message: `--robust ${path}: a tolerance of a pressure is a difference and cannot be absolute`, hint: 'write e.g. `±10 kPa`' };
  const value: Tolerance = { path };
  if (tol.value.unit === '%') value.rel = tol.value.si;
  else value.abs = tol.value.si;
  return { ok: true, value };
}

/** Offsets of one case: −1..1 per tolerance (a corner is ±1). */
export type RobustCase = number[];

/** The 2^k corners, first tolerance slowest. */
export function cornerCases(k: number): RobustCase[] {
  const out: RobustCase[] = [];
  for (let i = 0; i < 2 ** k; i++) out.push(Array.from({ length: k }, (_, j) => ((i >> (k - 1 - j)) & 1 ? 1 : -1)));
  return out;
}

/** N uniform draws in the box, case k from caseStream(seed, k). */
export function sampleCases(k: number, samples: number, seed: number): RobustCase[] {
  return Array.from({ length: samples }, (_, i) => {
    const rng = caseStream(seed, i);
    return Array.from({ length: k }, () => 2 * rng.uniform() - 1);
  });
}

/** The value of a toleranced parameter in a case: centre + offset·half-width. */
export function perturbed(t: Tolerance, centre: number, offset: number): number {
  const half = t.rel !== undefined ? t.rel * Math.abs(centre) : (t.abs as number);
  return centre + offset * half;
}
