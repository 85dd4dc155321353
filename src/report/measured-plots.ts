/**
 * Measured traces in a report (`plenum report --data`): for each kind of quantity recorded, one
 * chart with the simulated channel as a line and the readings as hollow markers of the same
 * colour, and one residual panel (simulated − measured at the reading times, read from the
 * dense output, filled markers) with its RMSE per channel in the caption. Pressures are shown
 * gauge whether recorded absolute or gauge.
 */
import type { MeasuredOverlay, ReportInput } from '../transient/report-input.js';
import { displayScale, type DisplayKind } from '../units/display.js';
import { chartSvg, styleAt, type ChartPoint, type ChartSeries, type LegendItem, type SeriesStyle } from './svg-chart.js';
import { sigText } from './svg.js';
import { chamberStyles, channel } from './report-data.js';
import type { Figure, FigureOptions } from './plots.js';

/** Readings drawn per channel at most (evenly thinned beyond). */
const MAX_MARKS = 300;

const KIND_OF: Record<string, DisplayKind> = { pressure: 'gauge', gauge: 'gauge', volume: 'volume', mass: 'mass', temperature: 'temperature', flow: 'flow', stretch: 'stretch', reynolds: 'reynolds', position: 'position', velocity: 'velocity' };
const TITLE: Partial<Record<DisplayKind, string>> = { gauge: 'gauge pressure', volume: 'volume', mass: 'mass', temperature: 'temperature', flow: 'mass flow', stretch: 'stretch', reynolds: 'Reynolds number', position: 'position', velocity: 'velocity' };

function quantity(key: string): string {
  return key.slice(key.lastIndexOf('.') + 1);
}

function thin(n: number): number[] {
  const step = Math.max(1, Math.ceil(n / MAX_MARKS));
  const out: number[] = [];
  for (let k = 0; k < n; k += step) out.push(k);
  return out;
}

export function measuredFigures(input: ReportInput, opts: FigureOptions = {}): Figure[] {
  const measured = input.measured ?? [];
  if (!measured.length) return [];
  const pa = input.result.ambient;
  const styles = chamberStyles(input);
  const keys = [...new Set(measured.map((m) => m.key))];
  const styleOf = new Map<string, SeriesStyle>(keys.map((k, i) => [k, styles.get(k.slice(0, k.lastIndexOf('.'))) ?? styleAt(i, input.topology.chambers.length)]));
  const r = input.result;
  const tEnd = Math.max(r.end, ...measured.map((m) => m.times[m.times.length - 1] ?? 0));
  const ts = displayScale('time', tEnd);
  const figs: Figure[] = [];
  const kinds = [...new Set(keys.map((k) => KIND_OF[quantity(k)] ?? 'stretch'))];
  for (const kind of kinds) {
    const group = measured.filter((m) => (KIND_OF[quantity(m.key)] ?? 'stretch') === kind);
    const toShown = (m: MeasuredOverlay, v: number): number => (quantity(m.key) === 'pressure' ? v - pa : v);
    const magnitude = Math.max(...group.flatMap((m) => m.values.map((v) => Math.abs(toShown(m, v)))).filter(Number.isFinite), 0);
    const s = displayScale(kind, magnitude);
    const unit = s.unit.replace(' gauge', '');
    const y = (m: MeasuredOverlay, v: number): number => toShown(m, v) * s.factor + s.offset;
    const series: ChartSeries[] = [];
    for (const key of [...new Set(group.map((m) => m.key))]) {
      const simKey = quantity(key) === 'pressure' ? `${key.slice(0, key.lastIndexOf('.'))}.gauge` : key;
      const sim = channel(input, simKey);
      if (sim) series.push({ name: `${key} simulated`, x: r.trace.times.map((t) => t * ts.factor), y: sim.map((v) => v * s.factor + s.offset), style: styleOf.get(key)! });
    }
    const points: ChartPoint[] = [];
    const resPoints: ChartPoint[] = [];
    const legend: LegendItem[] = [];
    const rmse: string[] = [];
    const rs = displayScale(kind === 'gauge' ? 'pressure' : kind, Math.max(...group.flatMap((m) => m.values.map((v, k) => Math.abs(m.simulated[k] - v))).filter(Number.isFinite), 0));
    const rUnit = rs.unit.replace(' abs', '');
    for (const m of group) {
      const st = styleOf.get(m.key)!;
      for (const k of thin(m.times.length)) {
        if (!Number.isFinite(m.values[k])) continue;
        points.push({ x: m.times[k] * ts.factor, y: y(m, m.values[k]), shape: st.marker, filled: false, color: st.color, size: 3.2 });
        const res = m.simulated[k] - m.values[k];
        if (Number.isFinite(res)) resPoints.push({ x: m.times[k] * ts.factor, y: res * rs.factor, shape: st.marker, filled: true, color: st.color, size: 3 });
      }
      legend.push({ label: `${m.key} measured (${m.file})`, marker: { shape: st.marker, filled: false, color: st.color } });
      let ss = 0, n = 0;
      m.values.forEach((v, k) => { const d = m.simulated[k] - v; if (Number.isFinite(d)) { ss += d * d; n++; } });
      if (n) rmse.push(`${m.key} in ${m.file}: RMSE ${sigText(Math.sqrt(ss / n) * rs.factor, 3)} ${rUnit} over ${n} readings`);
    }
    const id = `measured-${kind}`;
    const title = `Measured and simulated ${TITLE[kind] ?? kind}`;
    figs.push({
      id, title,
      caption: `Simulated ${TITLE[kind] ?? kind} (lines) with the recorded readings (hollow markers of the same colour${points.length < group.reduce((a, m) => a + m.times.length, 0) ? `; at most ${MAX_MARKS} a channel drawn` : ''}).`,
      svg: chartSvg({ id, title, subtitle: 'lines: simulation; hollow markers: measured', kind: 'time', xLabel: `time [${ts.unit}]`, yLabel: `${TITLE[kind] ?? kind}${unit ? ` [${unit}]` : ''}`, series, points, legendExtra: legend, xDomain: [0, tEnd * ts.factor], yIncludeZero: kind === 'gauge' }, { standalone: opts.standalone }),
      series: series.length,
    });
    const rid = `residuals-${kind}`;
    figs.push({
      id: rid, title: `Residuals of ${TITLE[kind] ?? kind}`,
      caption: `Simulated minus measured at each reading time (the simulation read from its dense output at exactly those times). ${rmse.join('; ')}.`,
      svg: chartSvg({ id: rid, title: `Residuals of ${TITLE[kind] ?? kind}`, subtitle: 'simulated − measured', kind: 'time', xLabel: `time [${ts.unit}]`, yLabel: `simulated − measured${rUnit ? ` [${rUnit}]` : ''}`, series: [], points: resPoints, legendExtra: legend.map((l) => ({ ...l, marker: { ...l.marker!, filled: true } })), refLines: [{ axis: 'y', value: 0, label: 'zero', tone: 'info' }], xDomain: [0, tEnd * ts.factor] }, { standalone: opts.standalone }),
      series: 0,
    });
  }
  return figs;
}
