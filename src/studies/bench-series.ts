/**
 * Measured time series from a bench, in plenum's own CSV form:
 *
 *   # synthetic demo data ...            (comment lines start with `#`)
 *   # set reservoirs.supply.pressure = 4 barg     (this recording's conditions, optional)
 *   time [s],finger.gauge [kPa],supply.pressure [bar abs]
 *   0,0,701.3
 *   ...
 *
 * The first column is the time (any time unit), every other column a probe `<element>.<quantity>`
 * with its unit in brackets. `.pressure` columns are absolute (as in plenum's CSV) unless their
 * unit says `gauge`; `.gauge` columns are gauge and may not say `abs`. Dimensionless quantities
 * (stretch, reynolds) are written `[-]`. A blank cell is a missing reading. Times must increase.
 * Values are converted to SI as the simulation reports them (Pa absolute for `.pressure`, Pa
 * gauge for `.gauge`, K, m³, kg, kg/s). Every problem is a diagnostic with file:line:column.
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { didYouMean } from '../diag/did-you-mean.js';
import type { Dimension } from '../units/dimensions.js';
import { mathUnit } from '../units/math.js';
import { dataDiag, splitCells } from './fit-data.js';
import { splitQualifier } from '../units/pressure.js';
import { readUnit } from '../units/quantity.js';

/** Stop listing bad cells after this many. */
const MAX_ERRORS = 20;

/** The dimension of each probe quantity. */
const QUANTITY_DIMENSION: Record<string, Dimension> = {
  pressure: 'pressure', gauge: 'pressure', volume: 'volume', mass: 'mass', temperature: 'temperature',
  flow: 'mass-flow', stretch: 'dimensionless', reynolds: 'dimensionless', position: 'length', velocity: 'velocity', force: 'force',
};

export interface SeriesColumn {
  /** Probe key `<element>.<quantity>`, as the simulation's channels are named. */
  key: string;
  /** The header cell as written. */
  header: string;
  /** The unit as written (for messages and tables). */
  unit: string;
  /** Header position. */
  line: number;
  column: number;
  /** values[k] at times[k], SI; NaN where the cell was blank. */
  values: Float64Array;
  /** value_SI = offset + factor · x. */
  factor: number;
  offset: number;
}

export interface MeasuredSeries {
  file: string;
  times: Float64Array;
  /** 1-based file line of each row. */
  lines: Int32Array;
  columns: SeriesColumn[];
  /** `# set PATH = VALUE` lines: this recording's conditions. */
  overrides: { path: string; value: string; line: number }[];
  /** Position of the time header (for "no overlap" diagnostics). */
  timePos: { line: number; column: number };
}

/** SI = offset + factor·x for a unit of a dimension (affine for °C); an error text otherwise. */
function unitMap(unit: string, dimension: Dimension): { factor: number; offset: number } | string {
  if (dimension === 'dimensionless') return ['-', '1', ''].includes(unit) ? { factor: 1, offset: 0 } : `a plain number is written \`[-]\`, not \`[${unit}]\``;
  const r = readUnit(`1 ${unit}`);
  if (!r.ok) return r.message;
  const si = { pressure: 'Pa', volume: 'm^3', mass: 'kg', temperature: 'K', 'mass-flow': 'kg/s', length: 'm', time: 's', velocity: 'm/s', force: 'N' }[dimension as string];
  if (!si) return `cannot read \`${unit}\``;
  try {
    const offset = mathUnit(`0 ${unit}`).toNumber(si);
    const factor = mathUnit(`1 ${unit}`).toNumber(si) - offset;
    return { factor, offset };
  } catch {
    return `\`${unit}\` is not a unit of ${dimension.replace('-', ' ')}`;
  }
}

/**
 * Reads a measured CSV. `ambient` (Pa) converts gauge readings of `.pressure` columns to absolute
 * and absolute readings of... nothing else: a `.gauge` column must be gauge.
 */
export function readMeasuredCsv(text: string, file: string, ambient: number): Result<MeasuredSeries> {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const errors: Diagnostic[] = [];
  const overrides: MeasuredSeries['overrides'] = [];
  let headerAt = -1;
  for (let i = 0; i < lines.length; i++) {
    const l = lines[i].trim();
    if (l === '') continue;
    if (l.startsWith('#')) {
      const set = /^#\s*set\s+([^=\s]+)\s*=\s*(.+?)\s*$/i.exec(l);
      if (set) overrides.push({ path: set[1], value: set[2], line: i + 1 });
      continue;
    }
    headerAt = i;
    break;
  }
  if (headerAt < 0) return { ok: false, diagnostics: [dataDiag(file, 1, 1, 'data-empty', 'the file has no data', 'start with a header such as `time [s],receiver.gauge [kPa]`, then one row per reading')] };
  const header = lines[headerAt];
  const delimiter = header.includes('\t') ? '\t' : header.includes(';') && !header.includes(',') ? ';' : ',';
  const cells = splitCells(header, delimiter);
  const at = (column: number, code: string, message: string, hint: string): void => { errors.push(dataDiag(file, headerAt + 1, column, code, message, hint)); };
  const parsed = cells.map((c) => {
    const m = /^(.*?)\s*(?:\[([^\]]*)\])?\s*$/.exec(c.text);
    return { name: (m?.[1] ?? c.text).trim(), unit: m?.[2]?.trim(), cell: c };
  });
  // the time column
  const t0 = parsed[0];
  let time = { factor: 1, offset: 0 };
  if (!/^(t|time)$/i.test(t0.name)) at(t0.cell.column, 'data-header', `the first column is \`${t0.cell.text}\`, not the time`, 'the first column is the time, e.g. `time [s]`');
  else if (t0.unit === undefined || t0.unit === '') at(t0.cell.column, 'data-units', `the time column \`${t0.cell.text}\` has no unit`, 'write `time [s]` (or `time [ms]`)');
  else {
    const u = unitMap(t0.unit, 'time');
    if (typeof u === 'string') at(t0.cell.column, 'data-units', `the time column: ${u}`, 'write `time [s]` or `time [ms]`');
    else time = u;
  }
  const columns: SeriesColumn[] = [];
  const seen = new Map<string, number>();
  for (const p of parsed.slice(1)) {
    const col = p.cell.column;
    const dot = p.name.lastIndexOf('.');
    const quantity = dot > 0 ? p.name.slice(dot + 1) : '';
    const dimension = QUANTITY_DIMENSION[quantity];
    if (!dimension) {
      at(col, 'data-header', `\`${p.cell.text}\` does not name a probe \`<element>.<quantity>\``, `quantities: ${Object.keys(QUANTITY_DIMENSION).join(', ')}; e.g. \`receiver.gauge [kPa]\``);
      continue;
    }
    if (p.unit === undefined) {
      at(col, 'data-units', `the column \`${p.cell.text}\` has no unit`, dimension === 'dimensionless' ? `write \`${p.name} [-]\`` : dimension === 'pressure' ? `write e.g. \`${p.name} [kPa]\`${quantity === 'pressure' ? ' (absolute) or `[kPa gauge]`' : ''}` : `write the unit in brackets, e.g. \`${p.name} [${{ volume: 'mL', mass: 'g', temperature: 'degC', 'mass-flow': 'g/s', length: 'mm' }[dimension as string] ?? 's'}]\``);
      continue;
    }
    if (seen.has(p.name)) {
      at(col, 'data-header', `the probe \`${p.name}\` has two columns`, 'give each probe one column (use a second file for a second recording)');
      continue;
    }
    let unit = p.unit;
    let offset = 0;
    if (dimension === 'pressure') {
      const q = splitQualifier(`1 ${unit}`);
      unit = q.body.slice(2).trim();
      if (quantity === 'gauge' && q.reference === 'abs') { at(col, 'data-units', `the gauge column \`${p.cell.text}\` says abs`, `write \`${p.name.slice(0, dot)}.pressure [${unit}]\` for absolute readings, or \`${p.name} [${unit}]\``); continue; }
      if (quantity === 'pressure' && q.reference === 'gauge') offset = ambient;
    }
    const u = unitMap(unit, dimension);
    if (typeof u === 'string') { at(col, 'data-units', `the column \`${p.cell.text}\`: ${u}`, `write a unit of ${dimension.replace('-', ' ')}`); continue; }
    seen.set(p.name, columns.length);
    columns.push({ key: p.name, header: p.cell.text, unit: p.unit, line: headerAt + 1, column: col, values: new Float64Array(0), factor: u.factor, offset: u.offset + offset });
  }
  if (!columns.length && !errors.length) at(1, 'data-header', 'the file has a time column but no probe columns', 'add columns such as `receiver.gauge [kPa]`');
  if (errors.length) return { ok: false, diagnostics: errors };

  const times: number[] = [];
  const rowLines: number[] = [];
  const values: number[][] = columns.map(() => []);
  const colIndex = parsed.slice(1).map((p) => seen.get(p.name) ?? -1);
  let more = 0;
  const bad = (line: number, column: number, message: string, hint: string): void => {
    if (errors.length < MAX_ERRORS) errors.push(dataDiag(file, line, column, 'data-row', message, hint));
    else more++;
  };
  for (let i = headerAt + 1; i < lines.length; i++) {
    const l = lines[i];
    if (l.trim() === '' || l.trimStart().startsWith('#')) continue;
    const c = splitCells(l, delimiter);
    if (c.length !== cells.length) { bad(i + 1, 1, `${c.length} cells, the header has ${cells.length} columns`, 'give every row one cell per column (leave a cell empty for a missing reading)'); continue; }
    const t = c[0].text === '' ? Number.NaN : Number(c[0].text);
    if (!Number.isFinite(t)) { bad(i + 1, c[0].column, `the time \`${c[0].text}\` is not a number`, 'write plain numbers; the unit goes in the header'); continue; }
    const ts = time.offset + time.factor * t;
    if (times.length && !(ts > times[times.length - 1])) {
      bad(i + 1, c[0].column, `the time ${c[0].text} does not increase (the row before, line ${rowLines[rowLines.length - 1]}, is at ${String((times[times.length - 1] - time.offset) / time.factor)})`, 'sort the rows by time and remove repeated times');
      continue;
    }
    const row: number[] = [];
    let ok = true;
    for (let j = 1; j < c.length; j++) {
      const k = colIndex[j - 1];
      const s = c[j].text;
      const x = s === '' ? Number.NaN : Number(s);
      if (s !== '' && !Number.isFinite(x)) { bad(i + 1, c[j].column, `\`${s}\` in column \`${cells[j].text}\` is not a number`, 'write plain numbers (units go in the header), or leave the cell empty'); ok = false; continue; }
      if (k >= 0) row[k] = columns[k].offset + columns[k].factor * x;
    }
    if (!ok) continue;
    times.push(ts);
    rowLines.push(i + 1);
    row.forEach((v, k) => values[k].push(v));
  }
  if (more) errors.push(dataDiag(file, 0, 0, 'data-row', `and ${more} more bad row${more === 1 ? '' : 's'}`, 'fix the rows above first'));
  if (errors.length) return { ok: false, diagnostics: errors };
  if (!times.length) return { ok: false, diagnostics: [dataDiag(file, headerAt + 1, 1, 'data-empty', 'the file has a header but no rows', 'add one row per reading')] };
  columns.forEach((col, k) => { col.values = Float64Array.from(values[k]); });
  return {
    ok: true,
    value: { file, times: Float64Array.from(times), lines: Int32Array.from(rowLines), columns, overrides, timePos: { line: headerAt + 1, column: t0.cell.column } },
    warnings: [],
  };
}

/**
 * Checks a recording against a model's channels and its run: every probe must exist (with a
 * suggestion when misspelt), and the readings must overlap the simulated time [0, duration].
 */
export function checkSeries(s: MeasuredSeries, channels: readonly string[], duration: number): Diagnostic[] {
  const out: Diagnostic[] = [];
  const known = new Set(channels);
  for (const c of s.columns) {
    if (!known.has(c.key)) {
      const close = didYouMean(c.key, known);
      out.push(dataDiag(s.file, c.line, c.column, 'data-probe', `the netlist has no probe \`${c.key}\``, close || `probes of this netlist: ${[...known].slice(0, 8).join(', ')}${known.size > 8 ? ', …' : ''}`));
    }
  }
  const inside = s.times.filter((t) => t >= 0 && t <= duration).length;
  if (inside === 0) {
    out.push(dataDiag(s.file, s.lines[0], s.timePos.column, 'data-time', `the readings (t = ${s.times[0]} … ${s.times[s.times.length - 1]} s) do not overlap the simulation (0 … ${duration} s)`, 'check the time unit in the header, or set `simulate.duration` to cover the recording'));
  }
  return out;
}
