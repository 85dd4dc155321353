import { describe, expect, it } from 'vitest';
import { gentLockStretch, membranePressure, type Membrane } from '../../src/physics/membrane.js';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const fd = (law: Membrane, l: number): number => {
  const h = 1e-6 * l;
  return (membranePressure(law, l + h).dp - membranePressure(law, l - h).dp) / (2 * h);
};

// μ = 0.4 MPa, t0/r0 = 0.02 (docs/references.md worked example).
const nh: Membrane = { kind: 'neo-hookean', r0: 0.05, t0: 0.001, mu: 0.4e6 };

describe('thin spherical membrane (Treloar 1975; Ogden 1984; Gent 1996)', () => {
  it('neo-Hookean: Δp(2) = 7875.000 Pa and Δp(7^(1/6)) = 9915.703 Pa = 1.2394629 μ t0/r0 (docs/references.md)', () => {
    expect(rel(membranePressure(nh, 2).dp, 7875)).toBeLessThan(1e-12);
    const lmax = 7 ** (1 / 6);
    expect(rel(lmax, 1.3830876)).toBeLessThan(1e-7);
    expect(rel(membranePressure(nh, lmax).dp, 9915.703)).toBeLessThan(1e-7);
    expect(rel(membranePressure(nh, lmax).dp / (0.4e6 * 0.02), 1.2394629)).toBeLessThan(1e-7);
    expect(Math.abs(membranePressure(nh, lmax).ddp)).toBeLessThan(1e-9 * 9915.703);
    expect(membranePressure(nh, 1).dp).toBe(0);
  });

  it('Mooney–Rivlin with C2 = 0 is neo-Hookean with μ = 2 C1 (Ogden 1984, §4.3)', () => {
    const mr: Membrane = { kind: 'mooney-rivlin', r0: 0.05, t0: 0.001, c1: 0.2e6, c2: 0 };
    for (const l of [1.1, 1.5, 3]) expect(rel(membranePressure(mr, l).dp, membranePressure(nh, l).dp)).toBeLessThan(1e-14);
  });

  it('Gent: lock stretch solves 2λ² + λ⁻⁴ − 3 = Jm; tends to neo-Hookean for large Jm (Gent 1996)', () => {
    for (const jm of [5, 97.2, 1000]) {
      const l = gentLockStretch(jm);
      expect(rel(2 * l * l + l ** -4 - 3, jm)).toBeLessThan(1e-14);
    }
    const g: Membrane = { kind: 'gent', r0: 0.05, t0: 0.001, mu: 0.4e6, jm: 1e12 };
    expect(rel(membranePressure(g, 2).dp, 7875)).toBeLessThan(1e-10);
    const g97: Membrane = { kind: 'gent', r0: 0.05, t0: 0.001, mu: 0.4e6, jm: 97.2 };
    expect(membranePressure(g97, gentLockStretch(97.2)).dp).toBe(Infinity);
    // pressure rises steeply towards the lock
    expect(membranePressure(g97, 0.99 * gentLockStretch(97.2)).dp).toBeGreaterThan(5 * 9915.703);
  });

  it('dΔp/dλ matches central differences for every law', () => {
    const laws: Membrane[] = [
      nh,
      { kind: 'mooney-rivlin', r0: 0.05, t0: 0.001, c1: 0.18e6, c2: 0.02e6 },
      { kind: 'gent', r0: 0.05, t0: 0.001, mu: 0.4e6, jm: 97.2 },
      { kind: 'gent', r0: 0.05, t0: 0.001, mu: 0.4e6, jm: 10 },
    ];
    for (const law of laws) {
      const top = law.kind === 'gent' ? 0.999 * gentLockStretch(law.jm) : Infinity;
      for (const l of [1, 1.2, 1.7, 2.5, 3.1].filter((x) => x < top)) {
        const d = membranePressure(law, l).ddp;
        expect(Math.abs(d - fd(law, l))).toBeLessThan(1e-6 * Math.max(Math.abs(d), 1e3));
      }
    }
  });
});
