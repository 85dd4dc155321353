/**
 * The figures of a run: gauge pressure, size (stretch or volume), flow and temperature against
 * time with the events marked, and the pressure–volume (pressure–stretch) chart where each
 * chamber's operating point rides on its wall law. Each chamber keeps one style (colour, dash,
 * marker) in every figure and in the network diagram.
 */
import { keepLargest } from '../transient/select.js';
import type { EquilibriumMark, ReportInput, WallCurve } from '../transient/report-input.js';
import { display, displayScale, type DisplayKind } from '../units/display.js';
import { chartSvg, styleAt, type ChartBand, type ChartEvent, type ChartPoint, type ChartRefLine, type ChartSeries, type LegendItem } from './svg-chart.js';
import { sigText } from './svg.js';
import { MAX_DIAGRAM_CHAMBERS, networkDiagram } from './diagram.js';
import { chamberStyles, channel, flowPaths } from './report-data.js';
import { measuredFigures } from './measured-plots.js';

export interface Figure {
  /** Short name, also the file name without `.svg`. */
  id: string;
  title: string;
  /** What to look for, for the report's figure caption. */
  caption: string;
  svg: string;
  /** Data series drawn (curves of the trace; wall laws not counted). */
  series: number;
}

export interface FigureOptions {
  /** Each SVG a file of its own (XML declaration, white background). */
  standalone?: boolean;
}

// ---- helpers --------------------------------------------------------------------------------

function maxAbs(values: Iterable<number>): number {
  let m = 0;
  for (const v of values) if (Number.isFinite(v) && Math.abs(v) > m) m = Math.abs(v);
  return m;
}

function scaled(values: number[], factor: number, offset = 0): number[] {
  return values.map((v) => v * factor + offset);
}

/** Event tone from its wording: limits exceeded are warnings. */
function eventTone(what: string): ChartEvent['tone'] {
  return /exceeds its|near vacuum/.test(what) ? 'warn' : 'normal';
}

interface TimeAxis { factor: number; unit: string; times: number[]; events: ChartEvent[]; domain: [number, number] }

function timeAxis(input: ReportInput): TimeAxis {
  const r = input.result;
  const tEnd = Math.max(r.end, r.trace.times[r.trace.times.length - 1] ?? 0);
  const s = displayScale('time', tEnd);
  return {
    factor: s.factor,
    unit: s.unit,
    times: scaled(r.trace.times, s.factor),
    events: r.events.map((e, i) => ({ x: e.t * s.factor, n: i + 1, what: `${display(e.t, 'time')}: ${e.what}`, tone: eventTone(e.what) })),
    domain: [0, tEnd * s.factor],
  };
}

/** Reference lines at the same value and of the same tone become one, naming all their owners. */
function mergeRefs(refs: (ChartRefLine & { owner: string; what: string })[]): ChartRefLine[] {
  const out: (ChartRefLine & { owners: string[]; what: string })[] = [];
  for (const r of refs) {
    const same = out.find((o) => o.value === r.value && o.tone === r.tone && o.what === r.what && o.axis === r.axis);
    if (same) same.owners.push(r.owner); else out.push({ ...r, owners: [r.owner] });
  }
  return out.map((o) => ({ axis: o.axis, value: o.value, tone: o.tone, label: `${o.owners.join(', ')} ${o.what}` }));
}

function timeChart(input: ReportInput, ax: TimeAxis, id: string, title: string, subtitle: string, yLabel: string,
  series: ChartSeries[], refLines: ChartRefLine[], yIncludeZero: boolean, opts: FigureOptions): string {
  return chartSvg({
    id, title, subtitle, kind: 'time', xLabel: `time [${ax.unit}]`, yLabel, series, events: ax.events, refLines,
    xDomain: ax.domain, yIncludeZero,
  }, { standalone: opts.standalone });
}

/** Chamber channels as series in one display unit chosen for their largest magnitude. */
function chamberSeries(input: ReportInput, ax: TimeAxis, quantity: string, kind: DisplayKind, names: string[]): { series: ChartSeries[]; unit: string; factor: number; offset: number } {
  const styles = chamberStyles(input);
  const data = names.map((n) => ({ n, v: channel(input, `${n}.${quantity}`) })).filter((d) => d.v !== undefined) as { n: string; v: number[] }[];
  const s = displayScale(kind, maxAbs(data.flatMap((d) => d.v)));
  return {
    unit: s.unit, factor: s.factor, offset: s.offset,
    series: data.map((d) => ({ name: d.n, x: ax.times, y: scaled(d.v, s.factor, s.offset), style: styles.get(d.n)! })),
  };
}

/**
 * Most series a chart draws. A large network (a cushion array, a skin of cells) would give a
 * chart a curve per chamber and a report of tens of megabytes that no one can read; its charts
 * show the chambers (or paths) whose plotted value changes most, and say so in the caption.
 * The tables list every chamber.
 */
export const MAX_SERIES = 24;

/** Most samples kept of a wall-law band shared by many chambers. */
const MAX_BAND_POINTS = 800;

/** The names whose channel changes most (max − min), at most MAX_SERIES, in netlist order. */
function mostChanging(input: ReportInput, names: string[], channelOf: (name: string) => string): string[] {
  return keepLargest(names, (n) => {
    let lo = Infinity, hi = -Infinity;
    for (const x of channel(input, channelOf(n)) ?? []) if (Number.isFinite(x)) { if (x < lo) lo = x; if (x > hi) hi = x; }
    return hi > lo ? hi - lo : 0;
  }, MAX_SERIES);
}

/** The caption's note when a chart shows a selection. */
function selectionNote(shown: number, total: number, what: string, quantity: string): string {
  return shown < total ? ` Shown: the ${shown} of ${total} ${what} whose ${quantity} changes most; the tables below list all.` : '';
}

/** Joins the samples of wall curves that share a law (same parameters) into one curve. */
function mergedBands(walls: WallCurve[]): { key: string; chambers: string[]; points: [number, number][]; deflation?: [number, number][]; extrema: WallCurve['extrema'] }[] {
  const groups = new Map<string, { key: string; chambers: string[]; points: [number, number][]; deflation?: [number, number][]; extrema: WallCurve['extrema'] }>();
  for (const w of walls) {
    const g = groups.get(w.key);
    if (!g) {
      groups.set(w.key, { key: w.key, chambers: [w.chamber], points: [...w.points], deflation: w.deflation ? [...w.deflation] : undefined, extrema: w.extrema });
      continue;
    }
    g.chambers.push(w.chamber);
    g.points.push(...w.points);
    if (w.deflation && g.deflation) g.deflation.push(...w.deflation);
  }
  const tidy = (p: [number, number][]): [number, number][] => {
    p.sort((a, b) => a[0] - b[0]);
    return p.filter((q, i) => i === 0 || q[0] !== p[i - 1][0]);
  };
  // many chambers on one law give many overlapping samples: thin them to a curve's worth
  const thin = (p: [number, number][]): [number, number][] => {
    if (p.length <= MAX_BAND_POINTS) return p;
    const step = (p.length - 1) / (MAX_BAND_POINTS - 1);
    return Array.from({ length: MAX_BAND_POINTS }, (_, i) => p[Math.round(i * step)]);
  };
  return [...groups.values()].map((g) => ({ ...g, points: thin(tidy(g.points)), deflation: g.deflation ? thin(tidy(g.deflation)) : undefined }));
}

function planeChart(input: ReportInput, axis: 'stretch' | 'volume', walls: WallCurve[], opts: FigureOptions): Figure | undefined {
  if (!walls.length) return undefined;
  const styles = chamberStyles(input);
  const gaugeScale = displayScale('gauge', 0);
  const xMag = maxAbs(walls.flatMap((w) => w.points.map((p) => p[0])));
  const xs = axis === 'stretch' ? { unit: '', factor: 1, offset: 0 } : displayScale('volume', xMag);
  const bands: ChartBand[] = [];
  const points: ChartPoint[] = [];
  for (const g of mergedBands(walls)) {
    const shared = g.chambers.length > 1;
    const color = shared ? '#6b6b6b' : styles.get(g.chambers[0])!.color;
    const name = shared ? `wall law of ${g.chambers.join(', ')}` : `${g.chambers[0]} wall law`;
    bands.push({ name: g.deflation ? `${name} (inflation)` : name, x: g.points.map((p) => p[0] * xs.factor), y: g.points.map((p) => p[1] * gaugeScale.factor), color });
    if (g.deflation) bands.push({ name: `${name} (deflation)`, x: g.deflation.map((p) => p[0] * xs.factor), y: g.deflation.map((p) => p[1] * gaugeScale.factor), color, dash: '10 7' });
    const x0 = g.points[0]?.[0] ?? 0;
    const x1 = g.points[g.points.length - 1]?.[0] ?? 0;
    for (const e of g.extrema) {
      if (e.x < x0 || e.x > x1) continue;
      const where = axis === 'stretch' ? `λ ${sigText(e.x, 3)}` : display(e.x, 'volume');
      points.push({
        x: e.x * xs.factor, y: e.gauge * gaugeScale.factor, shape: e.kind === 'max' ? 'triangle' : 'triangle-down', filled: false, color: '#1a1a1a', size: 6,
        label: `${e.kind === 'max' ? 'maximum' : 'minimum'} ${sigText(e.gauge / 1000, 3)} kPa`,
        title: `pressure ${e.kind === 'max' ? 'maximum' : 'minimum'} of ${g.chambers.join(', ')}: ${display(e.gauge, 'gauge')} at ${where}`,
      });
    }
  }
  const series: ChartSeries[] = [];
  const shown = mostChanging(input, walls.map((w) => w.chamber), (n) => `${n}.${axis}`);
  const shownSet = new Set(shown);
  for (const w of walls) {
    if (!shownSet.has(w.chamber)) continue;
    const xv = channel(input, `${w.chamber}.${axis}`);
    const yv = channel(input, `${w.chamber}.gauge`);
    if (!xv || !yv) continue;
    series.push({ name: w.chamber, x: scaled(xv, xs.factor), y: scaled(yv, gaugeScale.factor), style: styles.get(w.chamber)!, shape: 'path' });
  }
  const eq = equilibriumPoints(input.equilibria ?? [], shown, axis, xs.factor, gaugeScale.factor);
  points.push(...eq.points);
  const legendExtra: LegendItem[] = [
    { label: 'start', marker: { shape: 'circle', filled: false, color: '#1a1a1a' } },
    { label: 'end', marker: { shape: 'circle', filled: true, color: '#1a1a1a' } },
  ];
  if (points.some((p) => p.shape === 'triangle')) legendExtra.push({ label: 'pressure maximum', marker: { shape: 'triangle', filled: false, color: '#1a1a1a' } });
  if (eq.stable) legendExtra.push({ label: 'stable equilibrium', marker: { shape: 'square', filled: true, color: '#1a1a1a' } });
  if (eq.unstable) legendExtra.push({ label: 'unstable equilibrium', marker: { shape: 'square', filled: false, color: '#1a1a1a' } });
  const id = axis === 'stretch' ? 'pressure-stretch' : 'pressure-volume';
  const title = axis === 'stretch' ? 'Pressure against stretch' : 'Pressure against volume';
  const subtitle = 'each chamber\'s operating point (thin line) rides on its wall law (wide pale curve); arrow: direction of travel';
  const svg = chartSvg({
    id, title, subtitle, kind: 'plane',
    xLabel: axis === 'stretch' ? 'stretch λ = r/r0' : `volume [${xs.unit}]`,
    yLabel: 'gauge pressure [kPa]',
    series, bands, points, legendExtra, yIncludeZero: true,
  }, { standalone: opts.standalone });
  const caption = (axis === 'stretch'
    ? 'Where a wall law rises, a chamber that takes gas pushes back harder; past the pressure maximum (triangle) it gets easier to inflate, so of two connected chambers the larger one can take gas from the smaller. Hollow mark: start; filled mark: end.'
    : 'Each chamber\'s gauge pressure against its volume, over its wall law. Hollow mark: start; filled mark: end. A measured wall with hysteresis shows its deflation curve dashed.')
    + selectionNote(shown.length, walls.length, 'chambers', axis)
    + (input.equilibria?.length ? ` Equilibria (stable filled, unstable hollow) for the gas ${input.equilibriaGas === 'end' ? 'the chambers hold at the end of the run' : 'they hold at the start'}.` : '')
    + (input.equilibriaNote ? ` ${input.equilibriaNote}` : '');
  return { id, title, caption, svg, series: series.length };
}

function equilibriumPoints(marks: EquilibriumMark[], chambers: string[], axis: 'stretch' | 'volume', xf: number, yf: number): { points: ChartPoint[]; stable: boolean; unstable: boolean } {
  const points: ChartPoint[] = [];
  let stable = false, unstable = false;
  marks.forEach((m, k) => {
    for (const c of chambers) {
      const st = m.chambers[c];
      if (!st) continue;
      const x = axis === 'stretch' ? st.stretch : st.volume;
      if (x === undefined || !Number.isFinite(x)) continue;
      if (m.stable) stable = true; else unstable = true;
      points.push({
        x: x * xf, y: st.gauge * yf, shape: 'square', filled: m.stable, color: '#1a1a1a', size: 5,
        title: `${m.label ?? `equilibrium ${k + 1}`} (${m.stable ? 'stable' : 'unstable'}): ${c} at ${display(st.gauge, 'gauge')}`,
      });
    }
  });
  return { points, stable, unstable };
}

// ---- the figures ----------------------------------------------------------------------------

/** All figures of a run, in reading order: network, pressure–volume, then the time histories. */
export function reportFigures(input: ReportInput, opts: FigureOptions = {}): Figure[] {
  const figs: Figure[] = [];
  const topo = input.topology;
  const ax = timeAxis(input);
  const names = topo.chambers.map((c) => c.name);

  figs.push({
    id: 'network', title: 'Network',
    caption: topo.chambers.length > MAX_DIAGRAM_CHAMBERS
      ? `Not drawn: the network has ${topo.chambers.length} chambers, more than ${MAX_DIAGRAM_CHAMBERS}.`
      : 'Chambers, reservoirs, lines and valves. Arrows and masses show the net transfer of gas over the run; each chamber shows its gauge pressure at the start and at the end.',
    svg: networkDiagram(input, { standalone: opts.standalone }), series: 0,
  });

  // pressure–stretch for spheres, pressure–volume for the other compliant chambers
  const sphereWalls = input.walls.filter((w) => w.axis === 'stretch');
  const volumeWalls = input.walls.filter((w) => w.axis === 'volume');
  const ps = planeChart(input, 'stretch', sphereWalls, opts);
  if (ps) figs.push(ps);
  const pv = planeChart(input, 'volume', volumeWalls, opts);
  if (pv) figs.push(pv);

  // gauge pressure
  {
    const shown = mostChanging(input, names, (n) => `${n}.gauge`);
    const shownSet = new Set(shown);
    const c = chamberSeries(input, ax, 'gauge', 'gauge', shown);
    const raw: (ChartRefLine & { owner: string; what: string })[] = [];
    for (const ch of topo.chambers) {
      if (!shownSet.has(ch.name)) continue;
      if (ch.limits.gauge !== undefined) raw.push({ axis: 'y', value: ch.limits.gauge * c.factor, owner: ch.name, what: `pressure limit ${display(ch.limits.gauge, 'gauge')}`, label: '', tone: 'limit' });
    }
    for (const v of topo.valves) {
      if (v.opensAbove !== undefined && shownSet.has(v.from)) raw.push({ axis: 'y', value: v.opensAbove * c.factor, owner: v.name, what: `opens above ${display(v.opensAbove, 'gauge')}`, label: '', tone: 'info' });
    }
    const refs = mergeRefs(raw);
    figs.push({
      id: 'pressure', title: 'Gauge pressure',
      caption: 'Gauge pressure of each chamber. Numbered marks on the top edge are the events listed below; dashed red lines are declared limits.'
        + selectionNote(shown.length, names.length, 'chambers', 'pressure'),
      svg: timeChart(input, ax, 'pressure', 'Gauge pressure', 'gauge pressure of each chamber; numbered marks: events', `gauge pressure [${c.unit.replace(' gauge', '')}]`, c.series, refs, true, opts),
      series: c.series.length,
    });
  }

  // stretch of spheres, volume of the other compliant chambers
  const spheres = topo.chambers.filter((c) => c.sphere).map((c) => c.name);
  const compliant = topo.chambers.filter((c) => !c.sphere && !c.rigid).map((c) => c.name);
  if (spheres.length) {
    const shown = mostChanging(input, spheres, (n) => `${n}.stretch`);
    const shownSet = new Set(shown);
    const c = chamberSeries(input, ax, 'stretch', 'stretch', shown);
    const raw: (ChartRefLine & { owner: string; what: string })[] = [];
    for (const ch of topo.chambers) if (shownSet.has(ch.name) && ch.limits.stretch !== undefined) raw.push({ axis: 'y', value: ch.limits.stretch, owner: ch.name, what: `stretch limit ${sigText(ch.limits.stretch, 3)}`, label: '', tone: 'limit' });
    for (const g of mergedBands(sphereWalls)) {
      const m = g.extrema.find((e) => e.kind === 'max');
      if (m) raw.push({ axis: 'y', value: m.x, owner: g.chambers.join(', '), what: `pressure maximum of the wall law (λ ${sigText(m.x, 3)})`, label: '', tone: 'info' });
    }
    const refs = mergeRefs(raw);
    figs.push({
      id: 'stretch', title: 'Stretch',
      caption: 'Stretch λ = r/r0 of each spherical chamber. The dotted line marks the stretch of the wall law\'s pressure maximum: a chamber above it gets easier to inflate.'
        + selectionNote(shown.length, spheres.length, 'spheres', 'stretch'),
      svg: timeChart(input, ax, 'stretch', 'Stretch', 'stretch λ = r/r0 of each spherical chamber; numbered marks: events', 'stretch λ', c.series, refs, false, opts),
      series: c.series.length,
    });
  }
  if (compliant.length) {
    const shown = mostChanging(input, compliant, (n) => `${n}.volume`);
    const c = chamberSeries(input, ax, 'volume', 'volume', shown);
    figs.push({
      id: 'volume', title: 'Volume',
      caption: 'Volume inside each compliant wall (tubing volume not included); rigid chambers are left out.'
        + selectionNote(shown.length, compliant.length, 'compliant chambers', 'volume'),
      svg: timeChart(input, ax, 'volume', 'Volume', 'volume of each compliant chamber; numbered marks: events', `volume [${c.unit}]`, c.series, [], false, opts),
      series: c.series.length,
    });
  }

  // mass flow per line and valve
  const allPaths = flowPaths(input);
  const shownPaths = new Set(mostChanging(input, allPaths.map((p) => p.name), (n) => `${n}.flow`));
  const paths = allPaths.filter((p) => shownPaths.has(p.name));
  if (paths.length) {
    const data = paths.map((p) => ({ p, v: channel(input, p.channel) })).filter((d) => d.v !== undefined) as { p: (typeof paths)[number]; v: number[] }[];
    const s = displayScale('flow', maxAbs(data.flatMap((d) => d.v)));
    const series: ChartSeries[] = data.map((d, i) => ({ name: `${d.p.label} (${d.p.from} → ${d.p.to})`, x: ax.times, y: scaled(d.v, s.factor), style: styleAt(i, names.length) }));
    figs.push({
      id: 'flow', title: 'Mass flow',
      caption: 'Mass flow through each line and valve, positive in the direction from → to named in the legend.'
        + selectionNote(paths.length, allPaths.length, 'lines and valves', 'flow'),
      svg: timeChart(input, ax, 'flow', 'Mass flow', 'mass flow through each line and valve, positive from → to; numbered marks: events', `mass flow [${s.unit}]`, series, [], true, opts),
      series: series.length,
    });
  }

  // cylinders: piston position and velocity, and the gauge pressure of their sides
  const cyls = input.topology.cylinders ?? [];
  if (cyls.length) {
    const kinds: { q: string; kind: DisplayKind; title: string; what: string; keys: (c: string, double: boolean) => [string, string][] }[] = [
      { q: 'position', kind: 'position', title: 'Piston position', what: 'piston position of each cylinder (0: retracted)', keys: (c) => [[c, `${c}.position`]] },
      { q: 'velocity', kind: 'velocity', title: 'Piston velocity', what: 'piston velocity of each cylinder (positive: extending)', keys: (c) => [[c, `${c}.velocity`]] },
      {
        q: 'pressure', kind: 'gauge', title: 'Cylinder pressures', what: 'gauge pressure of each cylinder side',
        keys: (c, double) => (double ? [[`${c}.cap`, `${c}.cap.gauge`], [`${c}.rod`, `${c}.rod.gauge`]] : [[`${c}.cap`, `${c}.cap.gauge`]]),
      },
    ];
    for (const k of kinds) {
      const data = cyls.flatMap((c) => k.keys(c.name, c.doubleActing)).map(([name, key]) => ({ name, v: channel(input, key) }))
        .filter((d) => d.v !== undefined) as { name: string; v: number[] }[];
      if (!data.length) continue;
      const sc = displayScale(k.kind, maxAbs(data.flatMap((d) => d.v)));
      const series: ChartSeries[] = data.map((d, i) => ({ name: d.name, x: ax.times, y: scaled(d.v, sc.factor), style: styleAt(i, data.length) }));
      const refs: ChartRefLine[] = k.q === 'position' ? cyls.map((c) => ({ axis: 'y' as const, value: c.stroke * sc.factor, label: `${c.name} full stroke`, tone: 'info' as const })) : [];
      const unit = sc.unit.replace(' gauge', '');
      figs.push({
        id: `cylinder-${k.q}`, title: k.title,
        caption: `${k.what[0].toUpperCase()}${k.what.slice(1)}. Numbered marks on the top edge are the events listed below.`,
        svg: timeChart(input, ax, `cylinder-${k.q}`, k.title, `${k.what}; numbered marks: events`, `${k.title.toLowerCase()} [${unit}]`, series, refs, k.q === 'velocity', opts),
        series: series.length,
      });
    }
  }

  if (input.heat !== 'isothermal') {
    const shown = mostChanging(input, names, (n) => `${n}.temperature`);
    const c = chamberSeries(input, ax, 'temperature', 'temperature', shown);
    figs.push({
      id: 'temperature', title: 'Gas temperature',
      caption: `Gas temperature in each chamber (heat: ${input.heat}).${selectionNote(shown.length, names.length, 'chambers', 'temperature')}`,
      svg: timeChart(input, ax, 'temperature', 'Gas temperature', `gas temperature in each chamber (heat: ${input.heat}); numbered marks: events`, `temperature [${c.unit}]`, c.series, [], false, opts),
      series: c.series.length,
    });
  }
  figs.push(...measuredFigures(input, opts));
  return figs;
}
