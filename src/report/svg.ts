/**
 * A small SVG writer: byte-stable number formatting, escaping, elements, path strings, nice
 * axis ticks, and decimation of long series. Pure functions over numbers and strings; the
 * same input always gives the same bytes, so figures can be compared as golden files.
 *
 * References: Heckbert, "Nice numbers for graph labels", Graphics Gems (1990), pp. 61–63
 * (ticks on 1-2-5 steps); Jugel et al., "M4: a visualization-oriented time series data
 * aggregation", Proc. VLDB Endow. 7(10) (2014) 797–808 (first/min/max/last per pixel column).
 */

/** Digits after the point for coordinates: 1/100 px is far below what any screen or printer shows. */
const COORD_DECIMALS = 2;

/** A coordinate or length as short, locale-free text: at most two decimals, no "-0", no exponent. */
export function num(x: number): string {
  if (!Number.isFinite(x)) return '0';
  const f = 10 ** COORD_DECIMALS;
  const r = Math.round(x * f) / f;
  if (r === 0) return '0';
  // toFixed never uses an exponent for |r| < 1e21; trailing zeros are stripped
  return r.toFixed(COORD_DECIMALS).replace(/\.?0+$/, '');
}

/** Escapes text for XML content and attribute values, dropping characters XML 1.0 forbids. */
export function esc(s: string): string {
  return s
    // eslint-disable-next-line no-control-regex
    .replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, '')
    .replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

export type AttrValue = string | number | undefined | null | false;

/** One element; attributes in the order given (numbers through `num`), undefined ones left out. */
export function tag(name: string, attrs: Record<string, AttrValue>, ...children: string[]): string {
  let a = '';
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === null || v === false) continue;
    a += ` ${k}="${typeof v === 'number' ? num(v) : esc(v)}"`;
  }
  const body = children.join('');
  return body ? `<${name}${a}>${body}</${name}>` : `<${name}${a}/>`;
}

/** Text content (escaped) inside an element. */
export function text(attrs: Record<string, AttrValue>, content: string, name = 'text'): string {
  return tag(name, attrs, esc(content));
}

/** Path data through pixel points: "M1,2L3,4 5,6"; a non-finite point breaks the line. */
export function pathData(px: ArrayLike<number>, py: ArrayLike<number>): string {
  const parts: string[] = [];
  let run = 0;
  for (let i = 0; i < px.length; i++) {
    const x = px[i];
    const y = py[i];
    if (!Number.isFinite(x) || !Number.isFinite(y)) { run = 0; continue; }
    const p = `${num(x)},${num(y)}`;
    parts.push(run === 0 ? `M${p}` : run === 1 ? `L${p}` : ` ${p}`);
    run++;
  }
  return parts.join('');
}

// ---- scales and ticks -----------------------------------------------------------------------

export interface Ticks {
  /** The domain widened to whole steps. */
  lo: number;
  hi: number;
  step: number;
  values: number[];
  /** Decimals that show every tick exactly. */
  decimals: number;
}

/** Smallest of 1, 2, 5 × 10^k at least `raw`. */
function niceStep(raw: number): number {
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const m = f <= 1 + 1e-9 ? 1 : f <= 2 + 1e-9 ? 2 : f <= 5 + 1e-9 ? 5 : 10;
  return m * mag;
}

/**
 * Ticks on 1-2-5 steps covering [lo, hi] with about `target` intervals; the domain grows to
 * whole steps so the data never touch a frame edge between ticks. A degenerate range widens.
 */
export function niceTicks(lo: number, hi: number, target = 5): Ticks {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) { lo = 0; hi = 1; }
  if (hi < lo) [lo, hi] = [hi, lo];
  // a range below a part in 10⁹ of its values is flat (round-off, not a signal)
  if (hi - lo <= 1e-9 * Math.max(Math.abs(lo), Math.abs(hi)) || hi - lo === 0) {
    const pad = lo === 0 ? 1 : Math.abs(lo) * 0.1;
    lo -= pad;
    hi += pad;
  }
  const step = niceStep((hi - lo) / Math.max(1, target));
  const k0 = Math.floor(lo / step + 1e-9);
  const k1 = Math.ceil(hi / step - 1e-9);
  const values: number[] = [];
  const decimals = Math.max(0, -Math.floor(Math.log10(step) + 1e-9));
  for (let k = k0; k <= k1; k++) values.push(Number((k * step).toFixed(Math.min(20, decimals + 2))));
  return { lo: k0 * step, hi: k1 * step, step, values, decimals };
}

/** A tick value as text with the decimals of its step; "−" (U+2212) for negatives, as in print. */
export function tickLabel(v: number, decimals: number): string {
  const s = Math.abs(v) < 0.5 * 10 ** -decimals ? (0).toFixed(decimals) : v.toFixed(decimals);
  return s.startsWith('-') ? `\u2212${s.slice(1)}` : s;
}

/** A value for labels: `digits` significant figures, no exponent for ordinary sizes. */
export function sigText(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const out = String(Number(v.toPrecision(digits)));
  return out.startsWith('-') ? `\u2212${out.slice(1)}` : out;
}

/** Linear map from a data interval to a pixel interval. */
export function linear(d0: number, d1: number, r0: number, r1: number): (v: number) => number {
  const k = d1 === d0 ? 0 : (r1 - r0) / (d1 - d0);
  return (v) => r0 + (v - d0) * k;
}

// ---- decimation -----------------------------------------------------------------------------

/**
 * Indices to keep of a series with ascending x so that, drawn `columns` pixels wide over
 * [x0, x1], it looks the same as the whole: per pixel column the first, the lowest, the highest
 * and the last point, in their original order (M4). Short series come back whole.
 */
export function decimateColumns(x: ArrayLike<number>, y: ArrayLike<number>, x0: number, x1: number, columns: number): number[] {
  const n = x.length;
  if (n <= 4 * columns || !(x1 > x0)) return Array.from({ length: n }, (_, i) => i);
  const keep: number[] = [];
  let col = Number.NaN;
  let first = -1, lo = -1, hi = -1, last = -1;
  const flush = (): void => {
    if (first < 0) return;
    const set = [first, lo, hi, last].filter((v, k, a) => v >= 0 && a.indexOf(v) === k).sort((a, b) => a - b);
    keep.push(...set);
  };
  for (let i = 0; i < n; i++) {
    const c = Math.min(columns - 1, Math.max(0, Math.floor(((x[i] - x0) / (x1 - x0)) * columns)));
    if (c !== col || !Number.isFinite(y[i])) {
      flush();
      col = c;
      first = lo = hi = last = -1;
      if (!Number.isFinite(y[i])) { keep.push(i); col = Number.NaN; continue; }
      first = lo = hi = last = i;
      continue;
    }
    if (y[i] < y[lo]) lo = i;
    if (y[i] > y[hi]) hi = i;
    last = i;
  }
  flush();
  return keep;
}

/**
 * Indices to keep of a curve in pixel coordinates (x need not be monotone, e.g. a trajectory
 * on the pressure–volume plane): drop points closer than `minDist` px to the last one kept.
 * The first and the last point always stay.
 */
export function thinByDistance(px: ArrayLike<number>, py: ArrayLike<number>, minDist = 0.5): number[] {
  const n = px.length;
  if (n === 0) return [];
  const keep = [0];
  let kx = px[0], ky = py[0];
  const d2 = minDist * minDist;
  for (let i = 1; i < n - 1; i++) {
    const dx = px[i] - kx, dy = py[i] - ky;
    if (dx * dx + dy * dy >= d2 || !Number.isFinite(dx + dy)) {
      keep.push(i);
      kx = px[i];
      ky = py[i];
    }
  }
  if (n > 1) keep.push(n - 1);
  return keep;
}

/** Approximate advance width of text in a sans-serif face (for layout without a font engine). */
export function textWidth(s: string, fontSize: number): number {
  let w = 0;
  for (const ch of s) {
    if ('il.,:;|!\'ıI'.includes(ch)) w += 0.28;
    else if ('frtj()[]-'.includes(ch)) w += 0.36;
    else if ('mwMW'.includes(ch)) w += 0.86;
    else if (ch === ' ') w += 0.28;
    else if (/[A-Z]/.test(ch)) w += 0.7;
    else w += 0.6;
  }
  return w * fontSize;
}
