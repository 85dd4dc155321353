/**
 * What `plenum fit` prints and writes: the terminal report, JSON, the residual table, and the
 * chamber snippets (the fitted law, and a `measured` wall through the readings themselves).
 */
import { MEASURED_BINS, sig, type FitReport, type FitRow, type FittedParameter, type SegmentFit, type SegmentKind } from './fit.js';

/** Significant digits that show a value to about a tenth of its standard error. */
function digitsFor(p: FittedParameter): number {
  if (!(p.se > 0) || !Number.isFinite(p.se) || p.value === 0) return 6;
  return Math.min(8, Math.max(3, Math.ceil(Math.log10(Math.abs(p.value) / p.se)) + 2));
}

/** A pressure parameter in MPa, kPa or Pa, whichever reads best. */
function pressureText(x: number, digits: number): string {
  const a = Math.abs(x);
  if (a >= 1e5) return `${sig(x / 1e6, digits)} MPa`;
  if (a >= 100) return `${sig(x / 1e3, digits)} kPa`;
  return `${sig(x, digits)} Pa`;
}

function lengthText(x: number): string {
  return `${sig(x * 1000, 6)} mm`;
}

export function parameterText(p: FittedParameter, digits = digitsFor(p)): string {
  return p.unit === 'Pa' ? pressureText(p.value, digits) : sig(p.value, digits);
}

/** A chamber for the netlist's `chambers:` section with the fitted law (indented to paste there). */
export function chamberSnippet(report: FitReport, kind: SegmentKind = report.inflation ? 'inflation' : 'deflation', name = 'sample'): string {
  const f = report[kind] as SegmentFit;
  const lines = [
    `  # fitted to ${report.file} (${kind}, ${f.points} readings): R² = ${sig(f.r2, 5)}, RMSE = ${sig(f.rmse / 1000, 3)} kPa`,
    `  ${name}:`,
    `    wall: ${report.wall}`,
    `    radius: ${lengthText(report.geometry.radius)}`,
    `    thickness: ${lengthText(report.geometry.thickness)}`,
    ...f.parameters.map((p) => `    ${p.name}: ${parameterText(p)}`),
    '    start: { pressure: 0 kPa gauge }',
  ];
  return lines.join('\n') + '\n';
}

/**
 * Bin means of (volume, gauge) over equal intervals of stretch (equal volume intervals would
 * crowd the steep start of the curve into one bin), ascending in volume.
 */
function binned(rows: FitRow[], V0: number): [number, number][] {
  const lam = rows.map((r) => r.stretch);
  const lo = Math.min(...lam);
  const hi = Math.max(...lam);
  const bins = Math.max(3, Math.min(MEASURED_BINS, Math.floor(rows.length / 3)));
  const sum = Array.from({ length: bins }, () => ({ v: 0, p: 0, n: 0 }));
  rows.forEach((r, i) => {
    const b = hi > lo ? Math.min(bins - 1, Math.floor(((lam[i] - lo) / (hi - lo)) * bins)) : 0;
    sum[b].v += V0 * lam[i] ** 3;
    sum[b].p += r.gauge;
    sum[b].n++;
  });
  const means = sum.filter((s) => s.n > 0).map((s): [number, number] => [s.v / s.n, s.p / s.n]);
  // the curve keeps its ends: the first and last readings themselves, not the means of the end
  // bins (which start the curve inside the data, e.g. at 51.5 mL for data from 33.5 mL)
  const least = rows.reduce((a, r) => (r.stretch < a.stretch ? r : a), rows[0]);
  const most = rows.reduce((a, r) => (r.stretch > a.stretch ? r : a), rows[0]);
  const first: [number, number] = [V0 * least.stretch ** 3, least.gauge];
  const last: [number, number] = [V0 * most.stretch ** 3, most.gauge];
  const inner = means.filter(([v]) => v > first[0] && v < last[0]);
  return last[0] > first[0] ? [first, ...inner, last] : [first];
}

/**
 * A `measured` wall through the data themselves (bin means of each curve), with the deflation
 * curve when the data have one: hysteresis without choosing a law.
 */
export function measuredSnippet(report: FitReport, name = 'sample_measured'): string | undefined {
  const V0 = (4 / 3) * Math.PI * report.geometry.radius ** 3;
  const curve = (f: SegmentFit | undefined): [number, number][] | undefined => {
    if (!f) return undefined;
    const pts = binned(f.rows, V0);
    return pts.length >= 3 ? pts : undefined;
  };
  const up = curve(report.inflation);
  const down = curve(report.deflation);
  const main = up ?? down;
  if (!main) return undefined;
  const row = ([v, p]: [number, number]): string => `      - [${sig(v * 1e6, 5)} mL, ${sig(p / 1000, 5)} kPa]`;
  const lines = [
    `  # ${report.file} as measured (bin means${up && down ? ' of the inflation and deflation readings' : ''})`,
    `  ${name}:`,
    '    wall: measured',
    '    points:',
    ...main.map(row),
  ];
  if (up && down) lines.push('    deflation:', ...down.map(row));
  lines.push(`    start: { volume: ${sig(main[0][0] * 1e6, 5)} mL }`);
  return lines.join('\n') + '\n';
}

function segmentJson(f: SegmentFit): Record<string, unknown> {
  const by = (g: (p: FittedParameter) => unknown): Record<string, unknown> => Object.fromEntries(f.parameters.map((p) => [p.name, g(p)]));
  return {
    parameters: by((p) => p.value),
    standard_errors: by((p) => p.se),
    confidence_95: by((p) => [p.low, p.high]),
    at_bound: f.parameters.filter((p) => p.atBound).map((p) => p.name),
    fit: { readings: f.points, dof: f.dof, r2: f.r2, rmse: f.rmse, residual_sd: f.residualSd, excluded: f.excluded, iterations: f.iterations, status: f.status, converged: f.converged },
    residuals: f.rows.map((r) => ({ line: r.line, stretch: r.stretch, gauge: r.gauge, fitted: r.fitted, residual: r.residual })),
  };
}

/**
 * JSON: `{ wall, radius, thickness, parameters: { <netlist name>: SI }, standard_errors,
 * confidence_95, fit, residuals, segments, deflation?: {...}, snippet, measured_snippet }`.
 * The top-level parameters are the inflation fit's (the deflation fit's when there is no
 * inflation).
 */
export function fitJson(report: FitReport): string {
  const primary = (report.inflation ?? report.deflation) as SegmentFit;
  const out: Record<string, unknown> = {
    format: 1,
    kind: 'plenum-fit',
    wall: report.wall,
    radius: report.geometry.radius,
    thickness: report.geometry.thickness,
    file: report.file,
    curve: primary.kind,
    ...segmentJson(primary),
    segments: report.segments.map((s) => ({ kind: s.kind, first_line: s.firstLine, last_line: s.lastLine, readings: s.readings })),
  };
  if (report.inflation && report.deflation) out.deflation = segmentJson(report.deflation);
  out.notes = report.notes;
  out.warnings = report.warnings;
  out.snippet = chamberSnippet(report);
  const m = measuredSnippet(report);
  if (m) out.measured_snippet = m;
  return JSON.stringify(out, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}

/** Residual table: line, curve, stretch, measured and fitted gauge (Pa), residual (Pa). */
export function fitResidualCsv(report: FitReport): string {
  const lines = ['line,curve,stretch [-],gauge [Pa],fitted [Pa],residual [Pa]'];
  const rows = [report.inflation, report.deflation].filter((f): f is SegmentFit => !!f).flatMap((f) => f.rows.map((r) => ({ ...r, kind: f.kind })));
  rows.sort((a, b) => a.line - b.line);
  for (const r of rows) lines.push([r.line, r.kind, sig(r.stretch, 12), sig(r.gauge, 12), sig(r.fitted, 12), sig(r.residual, 12)].join(','));
  return lines.join('\n') + '\n';
}

function segmentText(f: SegmentFit): string[] {
  const out = [`  ${f.kind}: ${f.points} readings, R² = ${sig(f.r2, 6)}, RMSE = ${sig(f.rmse / 1000, 4)} kPa, s = ${sig(f.residualSd / 1000, 4)} kPa (${f.converged ? `converged, ${f.iterations} LM iterations` : `NOT converged: ${f.status}`})`];
  for (const p of f.parameters) {
    const d = digitsFor(p);
    const unit = p.unit === 'Pa' ? (Math.abs(p.value) >= 1e5 ? 'MPa' : 'kPa') : '';
    const scale = unit === 'MPa' ? 1e6 : unit === 'kPa' ? 1e3 : 1;
    const v = (x: number): string => sig(x / scale, d);
    out.push(`    ${p.name.padEnd(14)} ${v(p.value).padStart(10)} ± ${sig(p.se / scale, 2)} ${unit}  (95 %: ${v(p.low)} … ${v(p.high)})${p.atBound ? '  at its bound 0' : ''}`);
  }
  // A few residuals from each end and the largest, so a trend is visible without the CSV.
  const worst = f.rows.reduce((a, r) => (Math.abs(r.residual) > Math.abs(a.residual) ? r : a), f.rows[0]);
  out.push(`    largest residual ${sig(worst.residual / 1000, 3)} kPa at stretch ${sig(worst.stretch, 4)} (line ${worst.line})`);
  return out;
}

/** A report for the terminal: parameters with errors and intervals, fit quality, snippets. */
export function fitText(report: FitReport): string {
  const out = [`${report.wall} fit to ${report.file} (radius ${lengthText(report.geometry.radius)}, thickness ${lengthText(report.geometry.thickness)})`];
  if (report.segments.length > 1) out.push(`  segments: ${report.segments.map((s) => `${s.kind} lines ${s.firstLine}–${s.lastLine}`).join(', ')}`);
  for (const f of [report.inflation, report.deflation]) if (f) out.push(...segmentText(f));
  for (const w of report.warnings) out.push(`  WARNING: ${w}`);
  for (const n of report.notes) out.push(`  note: ${n}`);
  out.push('', 'chambers:', chamberSnippet(report).trimEnd());
  if (report.inflation && report.deflation) out.push(chamberSnippet(report, 'deflation', 'sample_deflation').trimEnd());
  const m = measuredSnippet(report);
  if (report.deflation && report.inflation && m) out.push(m.trimEnd());
  return out.join('\n') + '\n';
}
