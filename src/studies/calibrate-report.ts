/**
 * Outputs of a calibration: the table for people, the JSON (contract in netlist.md: status,
 * parameters { PATH: { value, stderr, low, high } }, channels { probe: { rmse, r2 } }, SI), the
 * residual CSV, and the calibrated netlist (the user's file with the new values, comments and
 * layout kept).
 */
import { isScalar, parseDocument } from 'yaml';
import { overrideValue, splitPath } from '../netlist/override.js';
import type { CalibrationReport } from './calibrate.js';
import { inUnit } from './free-params.js';

function num(x: number, digits = 12): number | null {
  return Number.isFinite(x) ? Number(x.toPrecision(digits)) : null;
}

function g(x: number, digits = 5): string {
  if (!Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e6 ? String(Number(x.toPrecision(digits))) : x.toExponential(digits - 1);
}

/** An SI difference (RMSE, scale) in a unit engineers read. */
export function engineering(x: number, unit: string): string {
  const scaled: Record<string, [number, string]> = { Pa: [1e-3, 'kPa'], 'm^3': [1e6, 'mL'], kg: [1e3, 'g'], 'kg/s': [1e3, 'g/s'] };
  const [f, u] = scaled[unit] ?? [1, unit === '-' ? '' : unit];
  return `${g(x * f, 4)}${u ? ` ${u}` : ''}`;
}

function table(rows: string[][]): string[] {
  const w = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(w[c]) : cell.padStart(w[c]))).join('  ').trimEnd());
}

export function calibrationText(r: CalibrationReport): string {
  const out: string[] = [];
  const files = r.experiments.map((e) => e.file).join(', ');
  out.push(`calibrated ${r.netlist} against ${files} (${r.readings} readings, ${r.parameters.length} free, ${r.simulations} simulations): ${r.message}`);
  out.push('');
  const unit = (i: number): string => {
    const m = r.free[i].map;
    return m.unit === '%' ? '%' : `${m.unit}${m.reference ? ` ${m.reference}` : ''}`;
  };
  const rows = [['parameter', 'value', 'std. error', '95 % interval', 'start', 'unit']];
  r.parameters.forEach((p, i) => {
    const f = r.free[i];
    const v = (x: number): string => g(inUnit(f, x, r.ambient));
    const se = Number.isFinite(p.stderr) ? g(inUnit(f, p.value + p.stderr, r.ambient) - inUnit(f, p.value, r.ambient), 3) : '–';
    rows.push([p.path + (p.atBound ? ` (at ${p.atBound} bound)` : ''), v(p.value), se, Number.isFinite(p.stderr) ? `${v(p.low)} … ${v(p.high)}` : '–', v(p.start), unit(i)]);
  });
  out.push(...table(rows).map((l) => `  ${l}`));
  if (r.parameters.length > 1) {
    out.push('', 'correlation:');
    const crow = [['', ...r.parameters.map((_, i) => `[${i + 1}]`)]];
    r.parameters.forEach((p, i) => crow.push([`[${i + 1}] ${p.path}`, ...r.correlation[i].map((c) => (Number.isFinite(c) ? c.toFixed(3) : '–'))]));
    out.push(...table(crow).map((l) => `  ${l}`));
  }
  out.push('');
  const ch = [['probe', 'readings', 'RMSE', 'R²', 'weight scale']];
  for (const c of r.channels) ch.push([c.key, String(c.readings), engineering(c.rmse, c.unit), g(c.r2, 6), engineering(c.sigma, c.unit)]);
  out.push(...table(ch).map((l) => `  ${l}`));
  if (r.experiments.length > 1) {
    out.push('', 'per recording:');
    const ex = [['recording', 'conditions', 'probe', 'RMSE', 'R²']];
    for (const e of r.experiments) for (const c of e.channels) ex.push([e.file, e.overrides.map((o) => `${o.path} = ${o.text}`).join('; ') || '(netlist)', c.key, engineering(c.rmse, c.unit), g(c.r2, 6)]);
    out.push(...table(ex).map((l) => `  ${l}`));
  }
  const skipped = r.experiments.reduce((s, e) => s + e.outside, 0);
  if (skipped) out.push('', `${skipped} reading time${skipped === 1 ? '' : 's'} outside the simulated time were not used`);
  if (r.warnings.length) out.push('', ...r.warnings.map((w) => `warning: ${w}`));
  out.push('', 'Intervals assume independent errors of equal variance per probe and a model that can');
  out.push('reproduce the recordings; a trend in the residuals (--residuals) means it cannot.');
  return out.join('\n') + '\n';
}

export function calibrationJson(r: CalibrationReport): string {
  const parameters: Record<string, unknown> = {};
  for (const p of r.parameters) {
    parameters[p.path] = { value: num(p.value), stderr: num(p.stderr), low: num(p.low), high: num(p.high), start: num(p.start), at_bound: p.atBound, netlist: p.text };
  }
  const channels: Record<string, unknown> = {};
  for (const c of r.channels) channels[c.key] = { rmse: num(c.rmse), r2: num(c.r2), readings: c.readings, unit: c.unit, sigma: num(c.sigma) };
  const out = {
    format: 1, kind: 'plenum-calibrate', status: r.status, message: r.message, netlist: r.netlist,
    parameters, channels,
    correlation: { parameters: r.parameters.map((p) => p.path), matrix: r.correlation.map((row) => row.map((c) => num(c, 6))) },
    warnings: r.warnings,
    fit: { readings: r.readings, dof: r.dof, s2: num(r.s2), iterations: r.iterations, simulations: r.simulations },
    experiments: r.experiments.map((e) => ({
      file: e.file, overrides: Object.fromEntries(e.overrides.map((o) => [o.path, o.text])), readings: e.readings, outside: e.outside,
      channels: Object.fromEntries(e.channels.map((c) => [c.key, { rmse: num(c.rmse), r2: num(c.r2), readings: c.readings }])),
    })),
  };
  return JSON.stringify(out, null, 2) + '\n';
}

/** One row per reading: `file,line,time [s],probe,unit,measured,simulated,residual` (SI). */
export function residualCsv(r: CalibrationReport): string {
  const unitOf = new Map(r.channels.map((c) => [c.key, c.unit]));
  const q = (s: string): string => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const lines = ['file,line,time [s],probe,unit,measured,simulated,residual'];
  for (const x of r.residuals) lines.push([q(x.file), x.line, num(x.time), x.key, unitOf.get(x.key) ?? '', num(x.measured), num(x.simulated), num(x.residual)].join(','));
  return lines.join('\n') + '\n';
}

/** The netlist with values set by path: comments, order and layout kept; `stamp` becomes a comment at the top. */
export function netlistWithValues(source: string, values: readonly { path: string; text: string }[], stamp: string): string {
  const doc = parseDocument(source, { version: '1.2', schema: 'core', merge: false, resolveKnownTags: false });
  for (const p of values) {
    const path = splitPath(p.path);
    const node = doc.getIn(path, true);
    const value = overrideValue(p.text);
    if (isScalar(node)) node.value = value;
    else doc.setIn(path, value);
  }
  const lines = stamp.split('\n').map((l) => ` ${l}`).join('\n');
  doc.commentBefore = doc.commentBefore ? `${doc.commentBefore}\n${lines}` : lines;
  return doc.toString();
}

/** The netlist with the calibrated values in place (and a comment saying where they came from). */
export function calibratedNetlist(source: string, r: CalibrationReport): string {
  const stamp = [
    `calibrated with plenum calibrate against ${r.experiments.map((e) => e.file).join(', ')} (${r.status}):`,
    ...r.parameters.map((p, i) => `  ${p.path} = ${p.text}${Number.isFinite(p.stderr) ? ` (standard error ${Math.abs(inUnit(r.free[i], p.value + p.stderr, r.ambient) - inUnit(r.free[i], p.value, r.ambient)).toPrecision(2)})` : ''}`),
  ].join('\n');
  return netlistWithValues(source, r.parameters, stamp);
}
