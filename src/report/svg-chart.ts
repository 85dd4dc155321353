/**
 * One chart as SVG: series against a time axis or on a plane (pressure–volume), with wide pale
 * curves beneath (wall laws), numbered event marks, reference lines (limits, set points), point
 * marks (start, end, maxima, equilibria), nice ticks and a legend. Series differ by colour, dash
 * pattern and marker, so a chart reads in greyscale print and for colour-blind readers.
 *
 * Colours: the qualitative palette of Okabe & Ito, "Color Universal Design (CUD): how to make
 * figures and presentations that are friendly to colorblind people", J*FLY (2008), without its
 * yellow (#F0E442), which is too pale on white paper.
 */
import {
  decimateColumns, esc, linear, niceTicks, num, pathData, tag, text, textWidth, thinByDistance, tickLabel,
} from './svg.js';

// ---- visual language ------------------------------------------------------------------------

/** Okabe–Ito order chosen so that neighbours in a legend differ most. */
export const PALETTE = ['#0072B2', '#D55E00', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#000000'] as const;
/** Dash patterns (SVG stroke-dasharray), cycled with a different period from the colours. */
export const DASHES = ['', '7 3', '2 2.5', '9 3 2 3', '4 4', '12 3 2 3 2 3'] as const;
export const MARKERS = ['circle', 'square', 'triangle', 'diamond', 'cross', 'triangle-down', 'plus'] as const;
export type MarkerShape = (typeof MARKERS)[number];

export const FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, 'DejaVu Sans', sans-serif";
const INK = '#1a1a1a';
const MUTED = '#5c5c5c';
const GRID = '#e4e4e4';
const LIMIT = '#a4161a';
const EVENT = '#6e6e6e';

export interface SeriesStyle { color: string; dash: string; marker: MarkerShape }

/**
 * The i-th series style: colour, dash and marker each cycle (periods 7, 6, 7), so neighbours
 * always differ in all three. `colourOffset` starts the colours elsewhere (flows are coloured
 * apart from chambers) while the first series stays solid.
 */
export function styleAt(i: number, colourOffset = 0): SeriesStyle {
  return { color: PALETTE[(i + colourOffset) % PALETTE.length], dash: DASHES[i % DASHES.length], marker: MARKERS[(i + colourOffset) % MARKERS.length] };
}

// ---- chart description ----------------------------------------------------------------------

export interface ChartSeries {
  name: string;
  /** Data values in display units; for `trace` x ascends. */
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  style: SeriesStyle;
  /** `trace` (default): a function of x, decimated per pixel column. `path`: a trajectory, start and end marked. */
  shape?: 'trace' | 'path';
}

/** A wide pale curve drawn beneath the series (a wall law). */
export interface ChartBand {
  name: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  color: string;
  dash?: string;
}

export interface ChartEvent { x: number; n: number; what: string; tone: 'normal' | 'warn' }
export interface ChartRefLine { axis: 'x' | 'y'; value: number; label: string; tone: 'limit' | 'info' }
export interface ChartPoint {
  x: number;
  y: number;
  shape: MarkerShape;
  filled: boolean;
  color: string;
  label?: string;
  title?: string;
  size?: number;
}

export interface LegendItem {
  label: string;
  line?: { color: string; dash: string; width: number; opacity?: number };
  marker?: { shape: MarkerShape; filled: boolean; color: string };
}

export interface ChartSpec {
  id: string;
  title: string;
  subtitle?: string;
  kind: 'time' | 'plane';
  xLabel: string;
  yLabel: string;
  series: ChartSeries[];
  bands?: ChartBand[];
  events?: ChartEvent[];
  refLines?: ChartRefLine[];
  points?: ChartPoint[];
  legendExtra?: LegendItem[];
  xDomain?: [number, number];
  /** Make the y axis reach zero (ambient, for gauge pressure). */
  yIncludeZero?: boolean;
  width?: number;
  height?: number;
}

export interface RenderOptions {
  /** A file of its own: XML declaration, namespace, white background. */
  standalone?: boolean;
}

// ---- small pure helpers ---------------------------------------------------------------------

/** A marker glyph centred on (x, y) with size r px; hollow markers are filled white. */
export function markerSvg(shape: MarkerShape, x: number, y: number, r: number, color: string, filled: boolean, extra: Record<string, string> = {}): string {
  const fill = filled ? color : '#ffffff';
  const common = { fill, stroke: color, 'stroke-width': 1.3, ...extra };
  switch (shape) {
    case 'circle': return tag('circle', { cx: x, cy: y, r: r * 0.9, ...common });
    case 'square': return tag('rect', { x: x - r * 0.8, y: y - r * 0.8, width: r * 1.6, height: r * 1.6, ...common });
    case 'triangle': return tag('path', { d: `M${num(x)},${num(y - r)}L${num(x + r * 0.95)},${num(y + r * 0.7)} ${num(x - r * 0.95)},${num(y + r * 0.7)}Z`, ...common });
    case 'triangle-down': return tag('path', { d: `M${num(x)},${num(y + r)}L${num(x + r * 0.95)},${num(y - r * 0.7)} ${num(x - r * 0.95)},${num(y - r * 0.7)}Z`, ...common });
    case 'diamond': return tag('path', { d: `M${num(x)},${num(y - r * 1.1)}L${num(x + r)},${num(y)} ${num(x)},${num(y + r * 1.1)} ${num(x - r)},${num(y)}Z`, ...common });
    case 'cross': return tag('path', { d: `M${num(x - r * 0.8)},${num(y - r * 0.8)}L${num(x + r * 0.8)},${num(y + r * 0.8)}M${num(x - r * 0.8)},${num(y + r * 0.8)}L${num(x + r * 0.8)},${num(y - r * 0.8)}`, fill: 'none', stroke: color, 'stroke-width': 1.8, ...extra });
    case 'plus': return tag('path', { d: `M${num(x - r)},${num(y)}L${num(x + r)},${num(y)}M${num(x)},${num(y - r)}L${num(x)},${num(y + r)}`, fill: 'none', stroke: color, 'stroke-width': 1.8, ...extra });
  }
}

function finiteExtent(values: Iterable<number>, into: [number, number]): void {
  for (const v of values) {
    if (!Number.isFinite(v)) continue;
    if (v < into[0]) into[0] = v;
    if (v > into[1]) into[1] = v;
  }
}

/** y of a series with ascending x at x = t, by linear interpolation (NaN outside). */
function interpolate(x: ArrayLike<number>, y: ArrayLike<number>, t: number): number {
  const n = x.length;
  if (n === 0 || t < x[0] || t > x[n - 1]) return Number.NaN;
  let lo = 0, hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x[mid] <= t) lo = mid; else hi = mid;
  }
  if (x[hi] === x[lo]) return y[lo];
  return y[lo] + ((t - x[lo]) / (x[hi] - x[lo])) * (y[hi] - y[lo]);
}

interface LegendLayout { height: number; svg: string }

function layoutLegend(items: LegendItem[], x0: number, x1: number, y0: number): LegendLayout {
  const rowH = 17;
  const sample = 28;
  let x = x0;
  let y = y0;
  const out: string[] = [];
  for (const it of items) {
    const w = sample + 6 + textWidth(it.label, 11.5) + 16;
    if (x > x0 && x + w > x1) { x = x0; y += rowH; }
    const cy = y + rowH / 2;
    const parts: string[] = [];
    if (it.line) {
      parts.push(tag('line', {
        x1: x, y1: cy, x2: x + sample, y2: cy, stroke: it.line.color, 'stroke-width': it.line.width,
        'stroke-dasharray': it.line.dash || undefined, 'stroke-opacity': it.line.opacity, 'stroke-linecap': it.line.width > 3 ? 'round' : undefined,
      }));
    }
    if (it.marker) parts.push(markerSvg(it.marker.shape, x + sample / 2, cy, 4, it.marker.color, it.marker.filled));
    parts.push(text({ x: x + sample + 6, y: cy + 4, 'font-size': 11.5, fill: INK }, it.label));
    out.push(tag('g', { class: 'legend-item' }, ...parts));
    x += w;
  }
  return { height: items.length ? y - y0 + rowH : 0, svg: out.length ? tag('g', { class: 'legend' }, ...out) : '' };
}

/** Clusters events closer than `gap` px; each cluster gets one tag. */
function clusterEvents(events: ChartEvent[], sx: (v: number) => number, gap: number): ChartEvent[][] {
  const sorted = [...events].sort((a, b) => a.x - b.x || a.n - b.n);
  const out: ChartEvent[][] = [];
  for (const e of sorted) {
    const last = out[out.length - 1];
    if (last && sx(e.x) - sx(last[0].x) < gap) last.push(e); else out.push([e]);
  }
  return out;
}

// ---- the chart ------------------------------------------------------------------------------

/** Renders a chart; the same spec always gives the same bytes. */
export function chartSvg(spec: ChartSpec, options: RenderOptions = {}): string {
  const W = spec.width ?? 860;
  const H = spec.height ?? (spec.kind === 'plane' ? 470 : 340);
  const left = 62;
  const right = 18;
  const bottom = 44;
  const id = spec.id;

  // legend first: its height sets the top margin
  const legendItems: LegendItem[] = [];
  for (const b of spec.bands ?? []) legendItems.push({ label: b.name, line: { color: b.color, dash: b.dash ?? '', width: 7, opacity: 0.28 } });
  for (const s of spec.series) legendItems.push({ label: s.name, line: { color: s.style.color, dash: s.style.dash, width: 2 }, marker: { shape: s.style.marker, filled: s.shape !== 'path', color: s.style.color } });
  legendItems.push(...(spec.legendExtra ?? []));
  const titleH = spec.subtitle ? 42 : 26;
  const legend = layoutLegend(legendItems, left, W - right, titleH + 2);
  // a row for the y unit (and off-scale notes), then a row for event tags, then the plot
  const unitRowY = titleH + legend.height + 16;
  const top = unitRowY + 26;
  const pw = W - left - right;
  const ph = H - top - bottom;

  // domains
  const xr: [number, number] = [Infinity, -Infinity];
  const yr: [number, number] = [Infinity, -Infinity];
  if (spec.xDomain) { xr[0] = spec.xDomain[0]; xr[1] = spec.xDomain[1]; }
  for (const s of spec.series) { if (!spec.xDomain) finiteExtent(Array.from(s.x), xr); finiteExtent(Array.from(s.y), yr); }
  const yData: [number, number] = [yr[0], yr[1]];
  for (const b of spec.bands ?? []) {
    if (!spec.xDomain) finiteExtent(Array.from(b.x), xr);
  }
  for (const p of spec.points ?? []) { finiteExtent([p.y], yr); if (!spec.xDomain) finiteExtent([p.x], xr); }
  // bands may run off to large values (a wall law near its lock): let them widen y only moderately
  if (spec.bands?.length) {
    const span0 = Number.isFinite(yr[1] - yr[0]) && yr[1] > yr[0] ? yr[1] - yr[0] : 1;
    const cap: [number, number] = [yr[0] - 0.35 * span0, yr[1] + 0.35 * span0];
    for (const b of spec.bands) {
      for (let i = 0; i < b.x.length; i++) {
        const v = b.y[i];
        if (!Number.isFinite(v) || b.x[i] < xr[0] || b.x[i] > xr[1]) continue;
        if (v < yr[0] && v >= cap[0]) yr[0] = v;
        if (v > yr[1] && v <= cap[1]) yr[1] = v;
      }
    }
  }
  if (spec.yIncludeZero) finiteExtent([0], yr);
  const offScale: string[] = [];
  const dataSpan = Number.isFinite(yData[1] - yData[0]) ? Math.max(yData[1] - yData[0], Math.abs(yData[1]) * 0.05, 1e-12) : 1;
  const refs = (spec.refLines ?? []).filter((r) => {
    if (r.axis === 'x') return true;
    const ok = r.value <= yr[1] + 0.6 * dataSpan && r.value >= yr[0] - 0.6 * dataSpan;
    if (!ok) offScale.push(r.label);
    return ok;
  });
  for (const r of refs) finiteExtent([r.axis === 'y' ? r.value : Number.NaN], yr);
  if (!Number.isFinite(xr[0])) { xr[0] = 0; xr[1] = 1; }
  if (!Number.isFinite(yr[0])) { yr[0] = 0; yr[1] = 1; }
  let xt = niceTicks(xr[0], xr[1], spec.kind === 'time' ? 8 : 7);
  if (spec.xDomain && spec.xDomain[1] > spec.xDomain[0]) {
    // a given domain (a run's duration) is kept exactly; ticks stay inside it
    const [d0, d1] = spec.xDomain;
    const eps = 1e-9 * (d1 - d0);
    xt = { ...xt, lo: d0, hi: d1, values: xt.values.filter((v) => v >= d0 - eps && v <= d1 + eps) };
  }
  const yt = niceTicks(yr[0], yr[1], spec.kind === 'plane' ? 7 : 5);
  const sx = linear(xt.lo, xt.hi, left, left + pw);
  const sy = linear(yt.lo, yt.hi, top + ph, top);

  const parts: string[] = [];
  parts.push(tag('title', { id: `${id}-title` }, esc(spec.title)));
  if (spec.subtitle) parts.push(tag('desc', {}, esc(spec.subtitle)));
  if (options.standalone) parts.push(tag('rect', { x: 0, y: 0, width: W, height: H, fill: '#ffffff' }));
  parts.push(tag('defs', {}, tag('clipPath', { id: `${id}-clip` }, tag('rect', { x: left, y: top, width: pw, height: ph }))));

  // title, subtitle, legend, y unit
  parts.push(text({ x: left, y: 18, 'font-size': 14.5, 'font-weight': 700, fill: INK }, spec.title));
  if (spec.subtitle) parts.push(text({ x: left, y: 35, 'font-size': 11.5, fill: MUTED }, spec.subtitle));
  parts.push(legend.svg);
  parts.push(text({ x: 10, y: unitRowY, 'font-size': 11.5, 'font-weight': 600, fill: INK }, spec.yLabel));

  // grid and ticks
  const grid: string[] = [];
  const labels: string[] = [];
  for (const v of xt.values) {
    const x = sx(v);
    grid.push(tag('line', { x1: x, y1: top, x2: x, y2: top + ph, stroke: GRID, 'stroke-width': 1 }));
    labels.push(tag('line', { x1: x, y1: top + ph, x2: x, y2: top + ph + 4, stroke: INK, 'stroke-width': 1 }));
    labels.push(text({ x, y: top + ph + 17, 'font-size': 11, fill: INK, 'text-anchor': 'middle' }, tickLabel(v, xt.decimals)));
  }
  for (const v of yt.values) {
    const y = sy(v);
    grid.push(tag('line', { x1: left, y1: y, x2: left + pw, y2: y, stroke: Math.abs(v) < 1e-12 && yt.lo < 0 ? '#a8a8a8' : GRID, 'stroke-width': 1 }));
    labels.push(tag('line', { x1: left - 4, y1: y, x2: left, y2: y, stroke: INK, 'stroke-width': 1 }));
    labels.push(text({ x: left - 7, y: y + 3.8, 'font-size': 11, fill: INK, 'text-anchor': 'end' }, tickLabel(v, yt.decimals)));
  }
  parts.push(tag('g', { class: 'grid' }, ...grid));
  parts.push(tag('path', { d: `M${num(left)},${num(top)}L${num(left)},${num(top + ph)} ${num(left + pw)},${num(top + ph)}`, fill: 'none', stroke: INK, 'stroke-width': 1.1 }));
  parts.push(tag('g', { class: 'ticks' }, ...labels));
  parts.push(text({ x: left + pw, y: H - 8, 'font-size': 11.5, 'font-weight': 600, fill: INK, 'text-anchor': 'end' }, spec.xLabel));

  const clip = `url(#${id}-clip)`;

  // wall-law bands beneath everything
  const bandSvg: string[] = [];
  for (const b of spec.bands ?? []) {
    const px = Array.from(b.x, (v) => sx(v));
    const py = Array.from(b.y, (v) => (Number.isFinite(v) ? sy(v) : Number.NaN));
    const keep = thinByDistance(px, py, 0.6);
    bandSvg.push(tag('path', {
      class: 'band', 'data-name': b.name, d: pathData(keep.map((i) => px[i]), keep.map((i) => py[i])),
      fill: 'none', stroke: b.color, 'stroke-opacity': 0.28, 'stroke-width': 7, 'stroke-linejoin': 'round', 'stroke-linecap': 'round',
      'stroke-dasharray': b.dash || undefined,
    }));
  }
  if (bandSvg.length) parts.push(tag('g', { class: 'bands', 'clip-path': clip }, ...bandSvg));

  // reference lines
  const refSvg: string[] = [];
  const refLabels: { x0: number; x1: number; y: number }[] = [];
  for (const r of refs) {
    const color = r.tone === 'limit' ? LIMIT : MUTED;
    const dash = r.tone === 'limit' ? '6 3' : '2 3';
    if (r.axis === 'y') {
      const y = sy(r.value);
      refSvg.push(tag('line', { x1: left, y1: y, x2: left + pw, y2: y, stroke: color, 'stroke-width': 1.2, 'stroke-dasharray': dash }));
      // labels of nearby lines must not overlap: stack them upwards
      const w = textWidth(r.label, 10.5);
      const x1 = left + pw - 4;
      let ly = y - 4;
      const hits = (a: number, b: number, yy: number): boolean => refLabels.some((l) => Math.abs(l.y - yy) < 11 && a < l.x1 && b > l.x0);
      while (hits(x1 - w, x1, ly) && ly > top + 12) ly -= 12;
      refLabels.push({ x0: x1 - w, x1, y: ly });
      refSvg.push(text({ x: x1, y: ly, 'font-size': 10.5, fill: color, 'text-anchor': 'end', class: 'ref-label', stroke: '#ffffff', 'stroke-width': 3, 'paint-order': 'stroke' }, r.label));
    } else {
      const x = sx(r.value);
      refSvg.push(tag('line', { x1: x, y1: top, x2: x, y2: top + ph, stroke: color, 'stroke-width': 1.2, 'stroke-dasharray': dash }));
      refSvg.push(text({ x: x + 4, y: top + ph - 6, 'font-size': 10.5, fill: color, class: 'ref-label' }, r.label));
    }
  }
  if (refSvg.length) parts.push(tag('g', { class: 'refs' }, ...refSvg));

  // event lines (beneath series), tags later (above)
  const clusters = clusterEvents((spec.events ?? []).filter((e) => e.x >= xt.lo && e.x <= xt.hi), sx, 16);
  const evLines: string[] = [];
  const evTags: string[] = [];
  for (const c of clusters) {
    const warn = c.some((e) => e.tone === 'warn');
    const color = warn ? LIMIT : EVENT;
    for (const e of c) evLines.push(tag('line', { x1: sx(e.x), y1: top, x2: sx(e.x), y2: top + ph, stroke: color, 'stroke-width': 1, 'stroke-dasharray': '1.5 3' }));
    const label = c.length === 1 ? String(c[0].n) : `${c[0].n}–${c[c.length - 1].n}`;
    const x = sx(c[0].x);
    const w = Math.max(15, textWidth(label, 10) + 8);
    const tip = c.map((e) => `${e.n}: ${e.what}`).join('\n');
    evTags.push(tag('g', { class: 'event', 'data-n': label },
      tag('title', {}, esc(tip)),
      tag('rect', { x: x - w / 2, y: top - 19, width: w, height: 14, rx: 7, fill: warn ? '#fbe9e9' : '#ffffff', stroke: color, 'stroke-width': 1 }),
      text({ x, y: top - 8.6, 'font-size': 10, fill: warn ? LIMIT : INK, 'text-anchor': 'middle' }, label),
      tag('line', { x1: x, y1: top - 5, x2: x, y2: top, stroke: color, 'stroke-width': 1 }),
    ));
  }
  // joined, not spread: a spread of many thousand arguments overflows the call stack
  if (evLines.length) parts.push(tag('g', { class: 'event-lines' }, evLines.join('')));

  // series
  const serSvg: string[] = [];
  const markSvg: string[] = [];
  const endLabels: { x: number; y: number; text: string; color: string }[] = [];
  const nSeries = spec.series.length;
  spec.series.forEach((s, si) => {
    const n = s.x.length;
    const px = new Float64Array(n);
    const py = new Float64Array(n);
    for (let i = 0; i < n; i++) { px[i] = sx(s.x[i]); py[i] = Number.isFinite(s.y[i]) ? sy(s.y[i]) : Number.NaN; }
    const keep = s.shape === 'path' ? thinByDistance(px, py, 0.5) : decimateColumns(px, py, left, left + pw, Math.round(pw));
    const d = pathData(keep.map((i) => px[i]), keep.map((i) => py[i]));
    serSvg.push(tag('path', {
      class: 'series', 'data-name': s.name, d, fill: 'none', stroke: s.style.color, 'stroke-width': 2,
      'stroke-dasharray': s.style.dash || undefined, 'stroke-linejoin': 'round',
    }));
    if (n === 0) return;
    if (s.shape === 'path') {
      // start hollow, end filled, and an arrow halfway along the path showing the direction
      markSvg.push(markerSvg(s.style.marker, px[0], py[0], 5.5, s.style.color, false, { class: 'start' }));
      markSvg.push(markerSvg(s.style.marker, px[n - 1], py[n - 1], 5.5, s.style.color, true, { class: 'end' }));
      endLabels.push({ x: px[n - 1], y: py[n - 1], text: s.name, color: s.style.color });
      let total = 0;
      const cum = [0];
      for (let k = 1; k < keep.length; k++) {
        total += Math.hypot(px[keep[k]] - px[keep[k - 1]], py[keep[k]] - py[keep[k - 1]]) || 0;
        cum.push(total);
      }
      if (total > 30) {
        for (const frac of total > 240 ? [0.3, 0.7] : [0.5]) {
          const target = total * frac;
          let k = cum.findIndex((c) => c >= target);
          if (k < 1) k = 1;
          const a = keep[k - 1], b = keep[k];
          const ang = Math.atan2(py[b] - py[a], px[b] - px[a]);
          const t = (target - cum[k - 1]) / Math.max(1e-9, cum[k] - cum[k - 1]);
          const mx = px[a] + t * (px[b] - px[a]);
          const my = py[a] + t * (py[b] - py[a]);
          const L = 9, Wd = 4.5;
          const tipX = mx + L / 2 * Math.cos(ang), tipY = my + L / 2 * Math.sin(ang);
          const bx = mx - L / 2 * Math.cos(ang), by = my - L / 2 * Math.sin(ang);
          const nx = -Math.sin(ang) * Wd, ny = Math.cos(ang) * Wd;
          markSvg.push(tag('path', { class: 'direction', d: `M${num(tipX)},${num(tipY)}L${num(bx + nx)},${num(by + ny)} ${num(bx - nx)},${num(by - ny)}Z`, fill: s.style.color }));
        }
      }
    } else {
      const M = 5;
      for (let k = 0; k < M; k++) {
        const frac = (k + (si + 0.5) / Math.max(1, nSeries)) / M;
        const xv = xt.lo + frac * (xt.hi - xt.lo);
        const yv = interpolate(s.x, s.y, xv);
        if (!Number.isFinite(yv)) continue;
        markSvg.push(markerSvg(s.style.marker, sx(xv), sy(yv), 3.8, s.style.color, true));
      }
    }
  });
  parts.push(tag('g', { class: 'series-group', 'clip-path': clip }, ...serSvg));
  // marks are not clipped: a start on the frame (a chamber starting at zero gauge) stays whole
  if (markSvg.length) parts.push(tag('g', { class: 'marks' }, ...markSvg));

  // point marks (maxima, equilibria) with labels
  const ptSvg: string[] = [];
  for (const p of spec.points ?? []) {
    const x = sx(p.x), y = sy(p.y);
    if (x < left - 1 || x > left + pw + 1 || y < top - 1 || y > top + ph + 1) continue;
    const g: string[] = [];
    if (p.title) g.push(tag('title', {}, esc(p.title)));
    g.push(markerSvg(p.shape, x, y, p.size ?? 5.5, p.color, p.filled));
    if (p.label) {
      const anchorEnd = x > left + pw * 0.7;
      g.push(text({
        x: anchorEnd ? x - 9 : x + 9, y: y - 8, 'font-size': 10.5, fill: INK, 'text-anchor': anchorEnd ? 'end' : 'start',
        stroke: '#ffffff', 'stroke-width': 3, 'paint-order': 'stroke', class: 'point-label',
      }, p.label));
    }
    ptSvg.push(tag('g', { class: 'point' }, ...g));
  }
  if (ptSvg.length) parts.push(tag('g', { class: 'points' }, ...ptSvg));
  // trajectories carry their names at their ends, so the chart reads without the legend
  const placed: { x: number; y: number }[] = [];
  const lblSvg: string[] = [];
  for (const l of endLabels) {
    // beside the end mark, on the side with room
    const anchorEnd = l.x + 10 + textWidth(l.text, 11.5) > left + pw;
    const x = anchorEnd ? l.x - 10 : l.x + 10;
    let y = l.y + 4;
    while (placed.some((p) => Math.abs(p.x - x) < 80 && Math.abs(p.y - y) < 13)) y += 13;
    placed.push({ x, y });
    lblSvg.push(text({
      x, y, 'font-size': 11.5, 'font-weight': 700, fill: l.color, 'text-anchor': anchorEnd ? 'end' : 'start',
      stroke: '#ffffff', 'stroke-width': 3, 'paint-order': 'stroke', class: 'end-label',
    }, l.text));
  }
  if (lblSvg.length) parts.push(tag('g', { class: 'end-labels' }, ...lblSvg));
  if (evTags.length) parts.push(tag('g', { class: 'events' }, evTags.join('')));
  if (offScale.length) {
    parts.push(text({ x: left + pw, y: unitRowY, 'font-size': 10.5, fill: LIMIT, 'text-anchor': 'end' }, `above the plotted range: ${offScale.join('; ')}`));
  }

  const root = tag('svg', {
    xmlns: 'http://www.w3.org/2000/svg',
    viewBox: `0 0 ${num(W)} ${num(H)}`,
    width: W,
    height: H,
    role: 'img',
    'aria-labelledby': `${id}-title`,
    class: 'plenum-chart',
    id,
    'font-family': FONT,
    'data-kind': spec.kind,
    'data-plot': `${num(left)} ${num(top)} ${num(pw)} ${num(ph)}`,
    'data-x': `${xt.lo} ${xt.hi}`,
    'data-y': `${yt.lo} ${yt.hi}`,
    'data-xlabel': spec.xLabel,
    'data-ylabel': spec.yLabel,
  }, ...parts);
  return options.standalone ? `<?xml version="1.0" encoding="UTF-8"?>\n${root}\n` : root;
}
