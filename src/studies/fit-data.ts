/**
 * Bench data for a wall-law fit: a CSV of size against pressure, logged while inflating (and
 * perhaps deflating) a sample. The header names each column's quantity and unit:
 *
 *   volume [mL],gauge [kPa]          stretch [-],gauge [kPa]          radius [mm],pressure [kPa abs]
 *
 * Size columns: `volume`, `stretch` (λ = r/r0, unit `-` or none) or `radius`; pressure
 * columns: `gauge` (gauge by its name) or `pressure` (whose unit must say `gauge` or `abs`, as
 * in a netlist). Units go through the netlist's unit parser; `time` and other columns are
 * ignored. Blank lines and lines starting with `#` are skipped; the delimiter is a comma, a
 * semicolon or a tab (whichever the header uses).
 */
import type { Diagnostic, Result } from '../diag/diagnostic.js';
import { splitQualifier } from '../units/pressure.js';
import { parseQuantity } from '../units/quantity.js';

/** Stop listing bad rows after this many (the rest are counted). */
const MAX_ROW_ERRORS = 20;

export type SizeQuantity = 'volume' | 'stretch' | 'radius';

export interface BenchRow {
  /** 1-based line in the file. */
  line: number;
  stretch: number;
  /** Gauge pressure, Pa. */
  gauge: number;
}

export interface BenchData {
  rows: BenchRow[];
  /** What the size column was, and the header as written. */
  size: SizeQuantity;
  columns: { size: string; pressure: string };
  /** Columns that were ignored, and similar remarks. */
  notes: string[];
}

export interface BenchGeometry {
  /** Unstretched radius r0, m. */
  radius: number;
  /** Ambient pressure for `abs` data, Pa. */
  ambient: number;
}

interface Column {
  index: number;
  header: string;
  /** Column start in the header line (1-based), for diagnostics. */
  column: number;
  /** value_SI = offset + factor · x. */
  factor: number;
  offset: number;
}

/** An error diagnostic of a data file. */
export function dataDiag(file: string, line: number, column: number, code: string, message: string, hint: string): Diagnostic {
  return { code, severity: 'error', message, file, line, column, path: [], hint };
}

/** The cells of a CSV line with their 1-based columns (quotes around a cell removed). */
export function splitCells(line: string, delimiter: string): { text: string; column: number }[] {
  const out: { text: string; column: number }[] = [];
  let start = 0;
  for (;;) {
    const at = line.indexOf(delimiter, start);
    const raw = at < 0 ? line.slice(start) : line.slice(start, at);
    const lead = raw.length - raw.trimStart().length;
    out.push({ text: raw.trim().replace(/^"(.*)"$/, '$1').trim(), column: start + lead + 1 });
    if (at < 0) break;
    start = at + delimiter.length;
  }
  return out;
}

function classify(name: string): SizeQuantity | 'gauge' | 'pressure' | 'time' | undefined {
  const n = name.toLowerCase();
  if (/^(t|time)\b/.test(n)) return 'time';
  if (n.includes('volume')) return 'volume';
  if (n.includes('stretch') || n === 'lambda' || n === 'λ') return 'stretch';
  if (n.includes('radius')) return 'radius';
  if (n.includes('gauge') || n.includes('gage')) return 'gauge';
  if (n.includes('pressure')) return 'pressure';
  return undefined;
}

/** Reads the bench CSV. λ comes from the size column (V = (4/3)π r0³ λ³ for volumes). */
export function readBenchCsv(text: string, file: string, geometry: BenchGeometry): Result<BenchData> {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\n|\r/);
  const errors: Diagnostic[] = [];
  const notes: string[] = [];
  const headerAt = lines.findIndex((l) => l.trim() !== '' && !l.trimStart().startsWith('#'));
  if (headerAt < 0) return { ok: false, diagnostics: [dataDiag(file, 1, 1, 'data-empty', 'the file has no data', 'start with a header such as `volume [mL],gauge [kPa]`, then one row per reading')] };
  const header = lines[headerAt];
  const delimiter = header.includes('\t') ? '\t' : header.includes(';') && !header.includes(',') ? ';' : ',';
  const cells = splitCells(header, delimiter);
  let size: { kind: SizeQuantity; col: Column } | undefined;
  let pressure: { kind: 'gauge' | 'pressure'; col: Column } | undefined;
  const V0 = (4 / 3) * Math.PI * geometry.radius ** 3;

  cells.forEach((cell, index) => {
    const m = /^(.*?)\s*(?:\[([^\]]*)\]|\(([^)]*)\))?\s*$/.exec(cell.text);
    const name = (m?.[1] ?? cell.text).trim();
    const unit = (m?.[2] ?? m?.[3] ?? '').trim();
    const kind = classify(name);
    const at = (message: string, hint: string): void => { errors.push(dataDiag(file, headerAt + 1, cell.column, 'data-header', message, hint)); };
    if (kind === undefined || kind === 'time') {
      if (kind === undefined) notes.push(`column \`${cell.text}\` ignored`);
      return;
    }
    if (kind === 'volume' || kind === 'stretch' || kind === 'radius') {
      if (size) { notes.push(`column \`${cell.text}\` ignored (the size is read from \`${size.col.header}\`)`); return; }
      let factor = 1;
      if (kind === 'stretch') {
        if (!['', '-', '1'].includes(unit)) { at(`the stretch column has unit \`${unit}\``, 'a stretch r/r0 has no unit: write `stretch [-]`'); return; }
      } else {
        if (!unit) { at(`the ${kind} column \`${cell.text}\` has no unit`, `write e.g. \`${kind === 'volume' ? 'volume [mL]' : 'radius [mm]'}\``); return; }
        const q = parseQuantity(`1 ${unit}`, kind === 'volume' ? 'volume' : 'length');
        if (!q.ok) { at(`column \`${cell.text}\`: ${q.message}`, q.hint); return; }
        factor = q.value;
      }
      size = { kind, col: { index, header: cell.text, column: cell.column, factor, offset: 0 } };
      return;
    }
    if (pressure) { notes.push(`column \`${cell.text}\` ignored (the pressure is read from \`${pressure.col.header}\`)`); return; }
    if (!unit) { at(`the pressure column \`${cell.text}\` has no unit`, 'write e.g. `gauge [kPa]` or `pressure [kPa abs]`'); return; }
    const { body, reference: unitRef } = splitQualifier(`1 ${unit}`);
    const nameRef = /\babs(olute)?\b/i.test(name) ? 'abs' : kind === 'gauge' ? 'gauge' : undefined;
    if (unitRef && nameRef && unitRef !== nameRef) { at(`column \`${cell.text}\` says both ${nameRef} and ${unitRef}`, 'write `gauge [kPa]` or `pressure [kPa abs]`'); return; }
    const reference = unitRef ?? nameRef;
    if (!reference) { at(`the pressure column \`${cell.text}\` does not say gauge or absolute`, `write \`pressure [${unit} gauge]\`, \`pressure [${unit} abs]\` or \`gauge [${unit}]\``); return; }
    const q = parseQuantity(body, 'pressure');
    if (!q.ok) { at(`column \`${cell.text}\`: ${q.message}`, q.hint); return; }
    pressure = { kind, col: { index, header: cell.text, column: cell.column, factor: q.value, offset: reference === 'abs' ? -geometry.ambient : 0 } };
  });
  if (!errors.length && !size) errors.push(dataDiag(file, headerAt + 1, 1, 'data-header', 'no column gives the size of the sample', 'name one column `volume [mL]`, `stretch [-]` or `radius [mm]`'));
  if (!errors.length && !pressure) errors.push(dataDiag(file, headerAt + 1, 1, 'data-header', 'no column gives the pressure', 'name one column `gauge [kPa]` or `pressure [kPa abs]`'));
  if (errors.length || !size || !pressure) return { ok: false, diagnostics: errors };

  const rows: BenchRow[] = [];
  let more = 0;
  const sz = size;
  const pr = pressure;
  for (let i = headerAt + 1; i < lines.length; i++) {
    const line = lines[i];
    if (line.trim() === '' || line.trimStart().startsWith('#')) continue;
    const c = splitCells(line, delimiter);
    const need = Math.max(sz.col.index, pr.col.index) + 1;
    const bad = (column: number, message: string, hint: string): void => {
      if (errors.length < MAX_ROW_ERRORS) errors.push(dataDiag(file, i + 1, column, 'data-row', message, hint));
      else more++;
    };
    if (c.length < need) { bad(1, `line ${i + 1} has ${c.length} value${c.length === 1 ? '' : 's'}, fewer than the ${need} the header needs`, `give every row a value for \`${sz.col.header}\` and \`${pr.col.header}\``); continue; }
    const values: number[] = [];
    for (const col of [sz.col, pr.col]) {
      const cell = c[col.index];
      const x = cell.text === '' ? NaN : Number(cell.text);
      if (!Number.isFinite(x)) { bad(cell.column, `\`${cell.text}\` in column \`${col.header}\` is not a number`, 'write plain numbers, e.g. `12.5` (units go in the header)'); break; }
      values.push(col.offset + col.factor * x);
    }
    if (values.length < 2) continue;
    const [s, p] = values;
    let stretch: number;
    if (sz.kind === 'stretch') stretch = s;
    else if (sz.kind === 'radius') stretch = s / geometry.radius;
    else stretch = Math.cbrt(s / V0);
    if (!(s > 0)) { bad(c[sz.col.index].column, `the ${sz.kind} \`${c[sz.col.index].text}\` is not positive`, 'sizes must be positive'); continue; }
    rows.push({ line: i + 1, stretch, gauge: p });
  }
  if (more) errors.push(dataDiag(file, 0, 0, 'data-row', `and ${more} more bad row${more === 1 ? '' : 's'}`, 'fix the rows above first'));
  if (errors.length) return { ok: false, diagnostics: errors };
  if (rows.length === 0) return { ok: false, diagnostics: [dataDiag(file, headerAt + 1, 1, 'data-empty', 'the file has a header but no rows', 'add one row per reading')] };
  return { ok: true, value: { rows, size: sz.kind, columns: { size: sz.col.header, pressure: pr.col.header }, notes }, warnings: [] };
}
