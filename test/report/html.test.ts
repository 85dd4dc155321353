/** The HTML report as text: self-contained, escaped, complete. (The browser test opens it.) */
import { describe, expect, it } from 'vitest';
import { simulate } from '../../src/transient/transient.js';
import { reportInput } from '../../src/transient/report-input.js';
import { netlistDescription, reportHtml } from '../../src/report/html.js';
import { modelFromText, runChecked } from '../helpers.js';
import { syntheticInput } from './fixture.js';
import { parseXml, withClass } from './xml.js';

/** A network none of the examples has: a shop-air line, an accumulator, two bellows, a pump, a vent. */
export const BENCH_NETLIST = `# A test bench: shop air charges an accumulator that feeds two bellows
# through a distribution block; a small pump tops up the left bellows.
format: 1
title: Bellows bench with accumulator
reservoirs:
  shop_air: { pressure: 300 kPa gauge }
chambers:
  accumulator: { wall: rigid, volume: 0.2 L, start: { pressure: 0 kPa gauge } }
  bellows_left: { wall: linear, volume: 60 mL, compliance: 0.3 mL/kPa, start: { pressure: 0 kPa gauge } }
  bellows_right: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.4 MPa, start: { stretch: 1.0 } }
lines:
  charge_hose: { from: shop_air, to: accumulator, diameter: 4 mm, length: 1 m }
  left_tube: { from: accumulator, to: bellows_left, diameter: 3 mm, length: 300 mm }
  right_tube: { from: accumulator, to: bellows_right, diameter: 2 mm, length: 300 mm }
valves:
  charge_valve:
    in-line: charge_hose
    conductance: 0.5 L/(s*bar)
    critical-ratio: 0.3
    initially: closed
    schedule:
      - { at: 20 ms, open: 100%, over: 10 ms }
      - { at: 300 ms, open: 0%, over: 10 ms }
  dump:
    from: bellows_left
    to: ambient
    orifice: 0.5 mm
    discharge-coefficient: 0.6
    initially: closed
    schedule:
      - { at: 500 ms, open: 100%, over: 10 ms }
feeds:
  pump: { into: bellows_left, rate: 0.5 L/min ANR }
simulate: { duration: 800 ms, sample: 2 ms, tolerance: 1e-7 }
expect:
  - name: accumulator charged
    probe: accumulator.gauge
    at: 300 ms
    above: 50 kPa gauge
`;

function inlineSvgs(html: string): string[] {
  return [...html.matchAll(/<svg xmlns[\s\S]*?<\/svg>(?=<figcaption)/g)].map((m) => m[0]);
}

describe('the HTML report', () => {
  it('is self-contained: no external fonts, scripts, styles, images or links, and a policy that forbids fetching', () => {
    const html = reportHtml(syntheticInput());
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).toContain('<meta http-equiv="Content-Security-Policy" content="default-src \'none\';');
    expect(html).not.toMatch(/<link\b/i);
    expect(html).not.toMatch(/\bsrc\s*=/i);
    expect(html).not.toMatch(/@import/i);
    expect(html).not.toMatch(/url\((?!#)/);
    expect(html).not.toMatch(/\b(fetch|XMLHttpRequest|WebSocket|EventSource|sendBeacon)\b/);
    const urls = [...html.matchAll(/https?:\/\/[^\s"'<>)]+/g)].map((m) => m[0]);
    expect(new Set(urls)).toEqual(new Set(['http://www.w3.org/2000/svg']));
    expect(html).toContain('@media print');
  });

  it('escapes the netlist text and the title, and runs only its own script', () => {
    const html = reportHtml(syntheticInput());
    expect(html.match(/<script/g)).toHaveLength(1);
    expect(html).toContain('# &lt;/pre&gt;&lt;script&gt;alert(1)&lt;/script&gt;');
    expect(html).toContain('<h1>Synthetic &lt;cell&gt; &amp; bag');
  });

  it('has the figures, each a well-formed SVG with its series', () => {
    const html = reportHtml(syntheticInput());
    const figs = [...html.matchAll(/<figure id="fig-([a-z-]+)" data-series="(\d+)">/g)].map((m) => ({ id: m[1], n: Number(m[2]) }));
    expect(figs.map((f) => f.id)).toEqual(['network', 'pressure-stretch', 'pressure-volume', 'pressure', 'stretch', 'volume', 'flow']);
    const svgs = inlineSvgs(html);
    expect(svgs).toHaveLength(figs.length);
    svgs.forEach((svg, i) => {
      const els = parseXml(svg);
      expect(withClass(els, 'path', 'series').length, figs[i].id).toBe(figs[i].n);
    });
  });

  it('lists events, warnings, expectations with pass and fail, solver work and the safety notes', () => {
    const html = reportHtml(syntheticInput());
    expect([...html.matchAll(/<li (?:class="warn" )?id="event-(\d+)">/g)].map((m) => Number(m[1]))).toEqual([1, 2, 3, 4, 5, 6]);
    expect(html).toContain('<li class="warn" id="event-6">');
    expect(html).toContain('bag exceeds its pressure limit of 55 kPa gauge at t = 1.5 s');
    expect(html).toContain('<span class="pass">pass</span>');
    expect(html).toContain('<span class="fail">FAIL</span>');
    expect(html).toContain('1 expectation failed');
    expect(html).toContain('synthetic.yaml:44:5');
    for (const t of ['odex', '<td>10</td>', 'rhs evaluations', 'LU factorisations']) expect(html).toContain(t);
    expect(html).toContain('Compressed gas stores energy');
    expect(html).toContain('Elastic chambers burst');
    expect(html).toContain('never calls a design safe');
    expect(html).toContain('licensed engineering practice');
  });

  it('names every element of a netlist it has never seen, in the diagram and the tables', () => {
    const model = modelFromText(BENCH_NETLIST, 'bench.yaml');
    const html = reportHtml(reportInput(model, runChecked(model)));
    const names = ['shop_air', 'accumulator', 'bellows_left', 'bellows_right', 'charge_hose', 'left_tube', 'right_tube', 'charge_valve', 'dump', 'pump', 'ambient'];
    const network = inlineSvgs(html)[0];
    for (const n of names) {
      expect(network, `diagram names ${n}`).toMatch(new RegExp(`>[^<]*\\b${n}\\b[^<]*<`));
    }
    const summary = html.slice(html.indexOf('<section id="summary">'), html.indexOf('<section id="events">'));
    for (const n of names) expect(summary, `summary names ${n}`).toContain(n);
    expect(html).toContain('A test bench: shop air charges an accumulator that feeds two bellows through a distribution block; a small pump tops up the left bellows.');
  });

  it('still reports a run that failed, saying so', () => {
    const model = modelFromText(BENCH_NETLIST.replace('tolerance: 1e-7 }', 'tolerance: 1e-7, max-steps: 3 }'), 'bench.yaml');
    const r = simulate(model);
    expect(r.status).toBe('failed');
    const html = reportHtml(reportInput(model, r));
    expect(html).toContain('<span class="badge bad">run failed</span>');
    expect(html).toContain('The run failed</span> at t =');
    expect(inlineSvgs(html).length).toBeGreaterThanOrEqual(4);
  });
});

describe('the netlist description', () => {
  it('is the leading comment block without editor directives', () => {
    expect(netlistDescription('# yaml-language-server: $schema=x.json\n# A rig.\n#   Two cells.\nformat: 1\n# not this')).toBe('A rig. Two cells.');
    expect(netlistDescription('format: 1\n')).toBe('');
  });
});
