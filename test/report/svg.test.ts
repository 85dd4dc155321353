/** The SVG writer's pieces: number formatting, escaping, path data, nice ticks, decimation. */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { decimateColumns, esc, niceTicks, num, pathData, tag, thinByDistance, tickLabel } from '../../src/report/svg.js';
import { parseXml } from './xml.js';

describe('number formatting for coordinates', () => {
  it('gives at most two decimals, no exponent and no negative zero', () => {
    expect(num(12.3456)).toBe('12.35');
    expect(num(12.3)).toBe('12.3');
    expect(num(40)).toBe('40');
    expect(num(-0.001)).toBe('0');
    expect(num(1e-7)).toBe('0');
    expect(num(-3.5)).toBe('-3.5');
    expect(num(123456789.126)).toBe('123456789.13');
    expect(num(Number.NaN)).toBe('0');
  });

  it('is a pure function of the value (byte-stable)', () => {
    fc.assert(fc.property(fc.double({ min: -1e7, max: 1e7, noNaN: true }), (x) => {
      const s = num(x);
      expect(s).toMatch(/^-?\d+(\.\d{1,2})?$/);
      expect(s).toBe(num(x));
      expect(Math.abs(Number(s) - x)).toBeLessThanOrEqual(0.005 + 1e-9 * Math.abs(x));
    }));
  });
});

describe('escaping', () => {
  it('escapes the five XML specials and drops characters XML 1.0 forbids', () => {
    expect(esc(`a<b>&"c'`)).toBe('a&lt;b&gt;&amp;&quot;c&#39;');
    expect(esc('x\u0001y\u000bz')).toBe('xyz');
    expect(esc('tab\tand\nnewline')).toBe('tab\tand\nnewline');
  });

  it('builds well-formed elements whatever the text', () => {
    fc.assert(fc.property(fc.string(), fc.string(), (a, b) => {
      const svg = tag('svg', { xmlns: 'http://www.w3.org/2000/svg', 'data-x': a }, tag('text', { x: 1 }, esc(b)));
      const els = parseXml(svg);
      expect(els[0].attrs['data-x']).toBe(a.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, ''));
    }));
  });
});

describe('path data', () => {
  it('moves, then draws, and breaks the line at non-finite points', () => {
    expect(pathData([0, 1, 2], [0, 1, 4])).toBe('M0,0L1,1 2,4');
    expect(pathData([0, 1, 2, 3, 4], [0, 1, Number.NaN, 3, 4])).toBe('M0,0L1,1M3,3L4,4');
    expect(pathData([], [])).toBe('');
  });
});

describe('nice ticks (Heckbert, Graphics Gems 1990: steps of 1, 2 or 5 × 10^k)', () => {
  it('gives round steps for typical ranges', () => {
    expect(niceTicks(0, 6, 8)).toMatchObject({ lo: 0, hi: 6, step: 1 });
    expect(niceTicks(0, 0.2192, 5).step).toBeCloseTo(0.05, 12);
    expect(niceTicks(0, 0.2192, 5).values).toEqual([0, 0.05, 0.1, 0.15, 0.2, 0.25]);
    expect(niceTicks(13.1, 16.3, 5)).toMatchObject({ lo: 13, hi: 17, step: 1 });
    expect(niceTicks(13.1, 16.3, 8)).toMatchObject({ lo: 13, hi: 16.5, step: 0.5 });
    expect(niceTicks(-23.4, 52.1, 5)).toMatchObject({ lo: -40, hi: 60, step: 20 });
  });

  it('widens a degenerate range instead of dividing by zero', () => {
    const t = niceTicks(5, 5);
    expect(t.lo).toBeLessThan(5);
    expect(t.hi).toBeGreaterThan(5);
    expect(niceTicks(0, 0).values.length).toBeGreaterThan(1);
  });

  it('always covers the range with 1-2-5 steps and a readable number of ticks', () => {
    fc.assert(fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.double({ min: 1e-6, max: 1e6, noNaN: true }), fc.integer({ min: 3, max: 10 }), (lo, span, target) => {
      const t = niceTicks(lo, lo + span, target);
      // covered up to a hair of one step (the ticks forgive round-off of 1e-9 step) and of the
      // values' own floating-point resolution
      const hair = (v: number): number => 1e-8 * t.step + 1e-15 * Math.abs(v);
      expect(t.lo).toBeLessThanOrEqual(lo + hair(lo));
      expect(t.hi).toBeGreaterThanOrEqual(lo + span - hair(lo + span));
      const mant = t.step / 10 ** Math.floor(Math.log10(t.step) + 1e-9);
      expect([1, 2, 5].some((m) => Math.abs(mant - m) < 1e-6)).toBe(true);
      expect(t.values.length).toBeGreaterThanOrEqual(2);
      expect(t.values.length).toBeLessThanOrEqual(2 * target + 3);
    }));
  });

  it('labels ticks with the decimals of the step and a true minus sign', () => {
    expect(tickLabel(-0.05, 2)).toBe('\u22120.05');
    expect(tickLabel(1e-17, 1)).toBe('0.0');
    expect(tickLabel(250, 0)).toBe('250');
  });
});

describe('decimation (M4: Jugel et al., PVLDB 7(10) 2014)', () => {
  it('keeps first, lowest, highest and last per pixel column, in order', () => {
    const n = 200_000;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const y = Float64Array.from({ length: n }, (_, i) => Math.sin(i / 5000) + (i === 123_457 ? 9 : 0) - (i === 77_777 ? 7 : 0));
    const keep = decimateColumns(x, y, 0, n - 1, 600);
    expect(keep.length).toBeLessThanOrEqual(4 * 600);
    expect(keep.length).toBeGreaterThan(600);
    expect(keep[0]).toBe(0);
    expect(keep[keep.length - 1]).toBe(n - 1);
    expect(keep).toContain(123_457);
    expect(keep).toContain(77_777);
    for (let k = 1; k < keep.length; k++) expect(keep[k]).toBeGreaterThan(keep[k - 1]);
  });

  it('leaves short series whole', () => {
    expect(decimateColumns([0, 1, 2], [3, 4, 5], 0, 2, 100)).toEqual([0, 1, 2]);
  });

  it('thins a path by distance but keeps its ends', () => {
    const px = Array.from({ length: 1000 }, (_, i) => i / 100);
    const py = px.map(() => 5);
    const keep = thinByDistance(px, py, 0.5);
    expect(keep[0]).toBe(0);
    expect(keep[keep.length - 1]).toBe(999);
    expect(keep.length).toBeLessThanOrEqual(22);
  });
});
