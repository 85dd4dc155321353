/** The figures: well-formed SVG, the right series, wall laws, events, limits, decimation, goldens. */
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { reportInput, type ReportInput } from '../../src/transient/report-input.js';
import { MAX_SERIES, reportFigures, type Figure } from '../../src/report/plots.js';
import { MAX_DIAGRAM_CHAMBERS } from '../../src/report/diagram.js';
import { chainNetlist } from '../../bench/networks.js';
import { modelFromFile, modelFromText, runChecked } from '../helpers.js';
import { sphereGauge, syntheticInput } from './fixture.js';
import { parseXml, withClass, type XmlElement } from './xml.js';

const GOLDEN = join(import.meta.dirname, 'golden');

function fig(figs: Figure[], id: string): { f: Figure; els: XmlElement[] } {
  const f = figs.find((x) => x.id === id);
  if (!f) throw new Error(`no figure ${id}; have ${figs.map((x) => x.id).join(', ')}`);
  return { f, els: parseXml(f.svg) };
}

function seriesNames(els: XmlElement[]): string[] {
  return withClass(els, 'path', 'series').map((e) => e.attrs['data-name']);
}

/** Numbers of the events shown as tags ("3" or "1–2"), expanded. */
function eventNumbers(els: XmlElement[]): number[] {
  return withClass(els, 'g', 'event').flatMap((e) => {
    const [a, b] = e.attrs['data-n'].split('–').map(Number);
    return Array.from({ length: (b ?? a) - a + 1 }, (_, k) => a + k);
  });
}

/** The visible text of an SVG (contents of its text elements). */
function textOf(svg: string): string[] {
  return [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]);
}

/** Points of a path's data "M1,2L3,4 5,6" (pixels). */
function points(d: string): [number, number][] {
  return [...d.matchAll(/(-?[\d.]+),(-?[\d.]+)/g)].map((m) => [Number(m[1]), Number(m[2])]);
}

describe('figures of the cushion runaway (two neo-Hookean cells past their maximum)', () => {
  let input: ReportInput;
  let figs: Figure[];
  beforeAll(() => {
    const model = modelFromFile('networks/cushion-runaway.yaml');
    input = reportInput(model, runChecked(model, 1e-9));
    figs = reportFigures(input, { standalone: true });
  });

  it('has the network, pressure–stretch and time charts, and no temperature chart when isothermal', () => {
    expect(figs.map((f) => f.id)).toEqual(['network', 'pressure-stretch', 'pressure', 'stretch', 'flow']);
    for (const f of figs) {
      expect(() => parseXml(f.svg), f.id).not.toThrow();
      expect(f.svg.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    }
  });

  it('draws one series per chamber and one per flow path, named', () => {
    expect(seriesNames(fig(figs, 'pressure').els)).toEqual(['cell_a', 'cell_b']);
    expect(seriesNames(fig(figs, 'stretch').els)).toEqual(['cell_a', 'cell_b']);
    expect(seriesNames(fig(figs, 'pressure-stretch').els)).toEqual(['cell_a', 'cell_b']);
    expect(seriesNames(fig(figs, 'flow').els)).toEqual(['crossover + crossover_valve (cell_a → cell_b)']);
    expect(fig(figs, 'pressure').f.series).toBe(2);
  });

  it('samples the wall law on the closed form and marks its maximum at λ = 7^(1/6) (Müller & Strehlow, Rubber and Rubber Balloons, 2004, ch. 2)', () => {
    // thin neo-Hookean sphere: Δp = (2μt0/r0)(λ⁻¹ − λ⁻⁷), maximal where λ⁶ = 7
    const w = input.walls.find((x) => x.chamber === 'cell_a')!;
    expect(w.axis).toBe('stretch');
    for (const [x, p] of w.points) expect(p).toBeCloseTo(sphereGauge(x), 6);
    const max = w.extrema.find((e) => e.kind === 'max')!;
    expect(max.x).toBeCloseTo(7 ** (1 / 6), 5);
    expect(max.gauge).toBeCloseTo(sphereGauge(7 ** (1 / 6)), 3);
    // the curve runs from the unstretched size past both trajectories
    expect(w.points[0][0]).toBeLessThanOrEqual(1);
    const { els } = fig(figs, 'pressure-stretch');
    const bands = withClass(els, 'path', 'band');
    expect(bands.map((b) => b.attrs['data-name'])).toEqual(['wall law of cell_a, cell_b']);
    const labels = els.filter((e) => e.name === 'text' && e.attrs.class === 'point-label');
    expect(labels.length).toBe(1);
  });

  it('puts each trajectory on its wall law: quasi-static, isothermal gauge = Δp(λ)', () => {
    const { els } = fig(figs, 'pressure-stretch');
    const band = points(withClass(els, 'path', 'band')[0].attrs.d);
    for (const s of withClass(els, 'path', 'series')) {
      for (const [x, y] of points(s.attrs.d)) {
        // nearest band point in pixels: the wide band is 7 px, the line must lie within it
        const dist = Math.min(...band.map(([bx, by]) => Math.hypot(bx - x, by - y)));
        expect(dist).toBeLessThan(3.5);
      }
    }
    expect(els.filter((e) => e.attrs.class === 'start').length).toBe(2);
    expect(els.filter((e) => e.attrs.class === 'end').length).toBe(2);
  });

  it('marks every event on every time axis', () => {
    const n = input.result.events.length;
    expect(n).toBeGreaterThan(0);
    for (const id of ['pressure', 'stretch', 'flow']) {
      expect(eventNumbers(fig(figs, id).els).sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, k) => k + 1));
    }
  });

  it('labels axes in engineering units', () => {
    const p = fig(figs, 'pressure').els.find((e) => e.name === 'svg')!;
    expect(p.attrs['data-ylabel']).toBe('gauge pressure [kPa]');
    expect(p.attrs['data-xlabel']).toBe('time [s]');
    expect(fig(figs, 'flow').els.find((e) => e.name === 'svg')!.attrs['data-ylabel']).toBe('mass flow [g/s]');
  });

  it('draws the network with every element named and the gas going from cell_a to cell_b', () => {
    const { f, els } = fig(figs, 'network');
    const texts = f.svg;
    for (const name of ['cell_a', 'cell_b', 'crossover', 'crossover_valve']) expect(texts).toContain(name);
    expect(withClass(els, 'g', 'valve').map((v) => v.attrs['data-name'])).toEqual(['crossover_valve']);
    const arrows = withClass(els, 'path', 'flow-arrow');
    expect(arrows.length).toBe(1);
    // the arrow's tip points right, from cell_a (left column) to cell_b
    const [tip, b1, b2] = points(arrows[0].attrs.d);
    expect(tip[0]).toBeGreaterThan((b1[0] + b2[0]) / 2);
  });

  it('renders the same bytes twice', () => {
    expect(reportFigures(input, { standalone: true }).map((f) => f.svg)).toEqual(figs.map((f) => f.svg));
  });
});

describe('figures of other networks', () => {
  it('gripper (adiabatic, relief valve): a temperature chart, limits and set points drawn', () => {
    const model = modelFromFile('networks/gripper-charge.yaml');
    const figs = reportFigures(reportInput(model, runChecked(model)));
    expect(figs.map((f) => f.id)).toEqual(['network', 'pressure-stretch', 'pressure', 'stretch', 'flow', 'temperature']);
    expect(seriesNames(fig(figs, 'temperature').els)).toEqual(['supply', 'finger']);
    expect(fig(figs, 'temperature').els.find((e) => e.name === 'svg')!.attrs['data-ylabel']).toBe('temperature [°C]');
    expect(seriesNames(fig(figs, 'pressure-stretch').els)).toEqual(['finger']);
    expect(seriesNames(fig(figs, 'flow').els)).toEqual(['feed_tube + solenoid (supply → finger)', 'relief (finger → ambient)']);
    const refs = fig(figs, 'pressure').els.filter((e) => e.attrs.class === 'ref-label');
    expect(refs.length).toBe(2);
    const pressure = fig(figs, 'pressure').f.svg;
    expect(pressure).toContain('finger pressure limit 170 kPa gauge');
    expect(pressure).toContain('relief opens above 150 kPa gauge');
    // a Gent wall has a maximum and a minimum before it stiffens
    const kinds = fig(figs, 'pressure-stretch').f.svg.match(/(maximum|minimum) [\d.]+ kPa/g);
    expect(kinds).toEqual(expect.arrayContaining([expect.stringMatching(/^maximum/), expect.stringMatching(/^minimum/)]));
  });

  it('manifold (rigid, linear, Mooney–Rivlin and measured walls): stretch and volume charts split, hysteresis drawn', () => {
    const model = modelFromFile('networks/manifold-mixed.yaml');
    const input = reportInput(model, runChecked(model));
    const figs = reportFigures(input);
    expect(figs.map((f) => f.id)).toEqual(['network', 'pressure-stretch', 'pressure-volume', 'pressure', 'stretch', 'volume', 'flow']);
    expect(seriesNames(fig(figs, 'pressure').els)).toEqual(['manifold', 'air_spring', 'pod', 'bladder']);
    expect(seriesNames(fig(figs, 'pressure-stretch').els)).toEqual(['pod']);
    expect(seriesNames(fig(figs, 'pressure-volume').els)).toEqual(['air_spring', 'bladder']);
    expect(seriesNames(fig(figs, 'volume').els)).toEqual(['air_spring', 'bladder']);
    expect(seriesNames(fig(figs, 'flow').els)).toHaveLength(5);
    const bands = withClass(fig(figs, 'pressure-volume').els, 'path', 'band').map((b) => b.attrs['data-name']);
    expect(bands).toEqual(['air_spring wall law', 'bladder wall law (inflation)', 'bladder wall law (deflation)']);
    expect(fig(figs, 'pressure-volume').els.find((e) => e.name === 'svg')!.attrs['data-xlabel']).toBe('volume [mL]');
    const words = textOf(fig(figs, 'network').f.svg);
    for (const name of ['regulator', 'manifold', 'air_spring', 'pod', 'bladder', 'supply_hose', 'inlet_check', 'to_spring', 'to_pod', 'to_bladder', 'bleed', 'ambient']) {
      expect(words.some((t) => new RegExp(`\\b${name}\\b`).test(t)), name).toBe(true);
    }
  });
});

describe('figures of a synthetic run', () => {
  it('stay small for long runs: min/max per pixel column', () => {
    const input = syntheticInput(200_001, 2);
    const figs = reportFigures(input);
    const { f, els } = fig(figs, 'pressure');
    const plotW = Number(els[0].attrs['data-plot'].split(' ')[2]);
    for (const s of withClass(els, 'path', 'series')) expect(points(s.attrs.d).length).toBeLessThanOrEqual(4 * Math.round(plotW));
    expect(f.svg.length).toBeLessThan(150_000);
    // and the pressure–stretch trajectory is thinned to about a point per pixel of travel
    for (const s of withClass(fig(figs, 'pressure-stretch').els, 'path', 'series')) expect(points(s.attrs.d).length).toBeLessThan(2000);
  });

  it('shows time in ms for short runs and marks limits as warnings', () => {
    const input = syntheticInput(401, 0.5);
    input.result.events = input.result.events.map((e) => ({ ...e, t: e.t / 4 }));
    const figs = reportFigures(input);
    const { els } = fig(figs, 'pressure');
    expect(els[0].attrs['data-xlabel']).toBe('time [ms]');
    const warn = withClass(els, 'g', 'event').filter((e) => e.attrs['data-n'].includes('6'));
    expect(warn.length).toBe(1);
    const svg = fig(figs, 'pressure').f.svg;
    expect(svg).toContain('bag pressure limit 55 kPa gauge');
  });

  it('marks equilibria, stable filled and unstable hollow, when given', () => {
    const input = syntheticInput();
    input.equilibria = [
      { label: 'equal cells', stable: true, chambers: { cell: { gauge: sphereGauge(1.2), volume: 0, stretch: 1.2 }, bag: { gauge: 20e3, volume: 160e-6 } } },
      { stable: false, chambers: { cell: { gauge: sphereGauge(1.6), volume: 0, stretch: 1.6 } } },
    ];
    const figs = reportFigures(input);
    const ps = fig(figs, 'pressure-stretch').f.svg;
    expect(ps).toContain('stable equilibrium');
    expect(ps).toContain('unstable equilibrium');
    expect(ps).toContain('equal cells (stable): cell at');
    expect(ps).toContain('equilibrium 2 (unstable): cell at');
    expect(fig(figs, 'pressure-volume').f.svg).toContain('equal cells (stable): bag at');
  });

  it('matches the golden files byte for byte (UPDATE_GOLDEN=1 rewrites them)', () => {
    const figs = reportFigures(syntheticInput(), { standalone: true });
    for (const id of ['network', 'pressure-stretch', 'pressure-volume', 'pressure', 'flow']) {
      const path = join(GOLDEN, `synthetic-${id}.svg`);
      const svg = figs.find((f) => f.id === id)!.svg;
      if (process.env.UPDATE_GOLDEN === '1') {
        mkdirSync(GOLDEN, { recursive: true });
        writeFileSync(path, svg);
      }
      expect(existsSync(path), `${path} is missing: run the tests once with UPDATE_GOLDEN=1 and look at the pictures`).toBe(true);
      expect(svg).toBe(readFileSync(path, 'utf8'));
    }
  });
});

describe('figures of a large network (a generated chain of 400 tanks and pods)', () => {
  let input: ReportInput;
  let figs: Figure[];
  beforeAll(() => {
    const model = modelFromText(chainNetlist(400, { duration: '50 ms', sample: '1 ms' }));
    input = reportInput(model, runChecked(model));
    figs = reportFigures(input);
  });

  it(`draw at most ${MAX_SERIES} curves a chart: the chambers whose value changes most, and say so`, () => {
    const { f, els } = fig(figs, 'pressure');
    const shown = seriesNames(els);
    expect(shown.length).toBe(MAX_SERIES);
    expect(f.caption).toContain(`the ${MAX_SERIES} of 400 chambers whose pressure changes most`);
    const swing = (name: string): number => {
      const v = input.result.trace.values[input.result.trace.channels.findIndex((c) => c.key === `${name}.gauge`)];
      return Math.max(...v) - Math.min(...v);
    };
    const all = input.topology.chambers.map((c) => c.name).sort((a, b) => swing(b) - swing(a));
    expect(new Set(shown)).toEqual(new Set(all.slice(0, MAX_SERIES)));
    expect(Math.min(...shown.map(swing))).toBeGreaterThanOrEqual(swing(all[MAX_SERIES]));
    for (const id of ['stretch', 'pressure-stretch', 'flow']) {
      const g = fig(figs, id);
      expect(seriesNames(g.els).length, id).toBeLessThanOrEqual(MAX_SERIES);
      expect(g.f.caption, id).toMatch(/Shown: the \d+ of \d+/);
    }
  });

  it('share one wall-law band among 200 pods, thinned to a curve', () => {
    const bands = withClass(fig(figs, 'pressure-stretch').els, 'path', 'band');
    expect(bands.length).toBe(1);
    expect(points(bands[0].attrs.d).length).toBeLessThanOrEqual(1000);
  });

  it(`do not draw a network of more than ${MAX_DIAGRAM_CHAMBERS} chambers, and say why`, () => {
    const { f } = fig(figs, 'network');
    expect(f.caption).toContain('Not drawn: the network has 400 chambers');
    expect(textOf(f.svg).join(' ')).toContain('too many to draw legibly');
    expect(f.svg.length).toBeLessThan(2000);
  });

  it('keep the figures small: what a network of two dozen chambers would take', () => {
    const total = figs.reduce((a, x) => a + x.svg.length, 0);
    expect(total).toBeLessThan(250_000); // 168 kB; a curve per chamber made it some 3 MB
  });
});
