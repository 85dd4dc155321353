/** The study's random numbers: xoshiro128**, per-case streams, uniform and normal deviates. */
import { describe, expect, it } from 'vitest';
import { caseStream, fmix32, Xoshiro128 } from '../../src/studies/rng.js';

describe('xoshiro128**', () => {
  it('matches the reference algorithm on a hand-traced start (Blackman & Vigna, ACM TOMS 47(4) 2021)', () => {
    // From state (1, 2, 3, 4): out = rotl(s1·5, 7)·9 = rotl(10, 7)·9 = 11520; the state becomes
    // (7, 0, 1026, 12288), so the next output is 0; then (12295, 1029, 1029, 25165824), giving
    // rotl(5145, 7)·9 = 5927040. Traced by hand from the published update rule.
    const g = new Xoshiro128([1, 2, 3, 4]);
    expect([g.nextU32(), g.nextU32(), g.nextU32()]).toEqual([11520, 0, 5927040]);
  });

  it('never starts from the all-zero state (which would stay zero for ever)', () => {
    const g = new Xoshiro128([0, 0, 0, 0]);
    const outs = Array.from({ length: 8 }, () => g.nextU32());
    expect(outs.some((x) => x !== 0)).toBe(true);
  });

  it('fmix32 is the MurmurHash3 finaliser (fmix32(0) = 0, and it mixes 1 into many bits)', () => {
    expect(fmix32(0)).toBe(0);
    const x = fmix32(1);
    expect(x.toString(2).split('').filter((b) => b === '1').length).toBeGreaterThan(8);
  });
});

describe('per-case streams', () => {
  it('are reproducible: the same (seed, case) gives the same numbers', () => {
    const a = caseStream(42, 17);
    const b = caseStream(42, 17);
    for (let i = 0; i < 100; i++) expect(a.uniform()).toBe(b.uniform());
  });

  it('differ between cases, and between seeds differing only above bit 32', () => {
    const first = (seed: number, k: number): number => caseStream(seed, k).uniform();
    const seen = new Set<number>();
    for (let k = 0; k < 2000; k++) seen.add(first(1, k));
    expect(seen.size).toBe(2000);
    expect(first(0, 3)).not.toBe(first(2 ** 32, 3));
  });

  it('give uniforms in (0, 1) with mean 1/2 and variance 1/12 (within 5 standard errors)', () => {
    const n = 200_000;
    const g = caseStream(7, 0);
    let s = 0;
    let s2 = 0;
    let lo = 1;
    let hi = 0;
    for (let i = 0; i < n; i++) {
      const u = g.uniform();
      s += u; s2 += u * u;
      lo = Math.min(lo, u); hi = Math.max(hi, u);
    }
    const mean = s / n;
    const variance = s2 / n - mean * mean;
    expect(lo).toBeGreaterThan(0);
    expect(hi).toBeLessThan(1);
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n));
    // Var of the sample variance of U(0,1) is (1/80 − 1/144)/n.
    expect(Math.abs(variance - 1 / 12)).toBeLessThan(5 * Math.sqrt((1 / 80 - 1 / 144) / n));
  });

  it('give normal deviates with mean 0, variance 1 and the normal tail: P(|z| > 1.96) ≈ 5 %', () => {
    const n = 200_000;
    const g = caseStream(11, 5);
    let s = 0;
    let s2 = 0;
    let tail = 0;
    for (let i = 0; i < n; i++) {
      const z = g.normal();
      s += z; s2 += z * z;
      if (Math.abs(z) > 1.959963984540054) tail++;
    }
    expect(Math.abs(s / n)).toBeLessThan(5 / Math.sqrt(n));
    expect(Math.abs(s2 / n - 1)).toBeLessThan(5 * Math.sqrt(2 / n));
    expect(Math.abs(tail / n - 0.05)).toBeLessThan(5 * Math.sqrt(0.05 * 0.95 / n));
  });

  it('refuses seeds and case numbers out of range (programmer errors)', () => {
    expect(() => caseStream(-1, 0)).toThrow(RangeError);
    expect(() => caseStream(1.5, 0)).toThrow(RangeError);
    expect(() => caseStream(1, 2 ** 32)).toThrow(RangeError);
  });
});
