import { describe, expect, it } from 'vitest';
import { DIMENSIONS } from '../../src/units/dimensions.js';
import { parseQuantity } from '../../src/units/quantity.js';
import { ALL_TABLES, WALL_LAWS } from '../../src/netlist/kinds.js';
import { gentLockStretch } from '../../src/netlist/chambers.js';
import { NAMED_GASES } from '../../src/netlist/gases.js';

describe('parameter tables', () => {
  it('have unique kinds and unique, documented parameters', () => {
    const kinds = ALL_TABLES.map((t) => t.kind);
    expect(new Set(kinds).size).toBe(kinds.length);
    for (const t of ALL_TABLES) {
      expect(t.doc.length, t.kind).toBeGreaterThan(5);
      const names = t.params.map((p) => p.name);
      expect(new Set(names).size, t.kind).toBe(names.length);
      for (const p of t.params) expect(p.doc.length, `${t.kind}.${p.name}`).toBeGreaterThan(3);
    }
  });

  it('give defaults that parse in their own dimension', () => {
    for (const t of ALL_TABLES) {
      for (const p of t.params) {
        if (p.default === undefined || !(p.dimension in DIMENSIONS)) continue;
        const r = parseQuantity(p.default, p.dimension as keyof typeof DIMENSIONS);
        expect(r.ok, `${t.kind}.${p.name}`).toBe(true);
      }
    }
  });

  it('cover the six wall laws of the contract', () => {
    expect(WALL_LAWS.map((w) => w.kind)).toEqual(['rigid', 'linear', 'neo-hookean', 'mooney-rivlin', 'gent', 'measured']);
  });
});

describe('gentLockStretch', () => {
  it('solves 2λ² + λ⁻⁴ − 3 = Jm (Gent, Rubber Chem. Technol. 69 (1996) 59, equibiaxial I1)', () => {
    for (const Jm of [1, 10, 97.2, 1000]) {
      const l = gentLockStretch(Jm);
      expect(l).toBeGreaterThan(1);
      expect(2 * l * l + l ** -4 - 3).toBeCloseTo(Jm, 9);
    }
    // Independent check: λ⁻⁴ is negligible at large Jm, so λ ≈ √((Jm + 3)/2) = 7.0781 for Jm = 97.2.
    expect(gentLockStretch(97.2)).toBeCloseTo(Math.sqrt((97.2 + 3) / 2), 3);
  });
});

describe('named gases (White, Viscous Fluid Flow, Table 1-2, from memory)', () => {
  it('are the physics module table (one source of gas data)', () => {
    expect(NAMED_GASES.air).toEqual({ name: 'air', molarMass: 28.9647e-3, gamma: 1.4, viscosity: { value: 1.716e-5, at: 273.15, sutherland: 110.4 } });
    expect(NAMED_GASES.nitrogen.viscosity.sutherland).toBe(107);
    expect(NAMED_GASES.helium.molarMass).toBeCloseTo(4.002602e-3, 12);
    expect(NAMED_GASES.helium.gamma).toBeCloseTo(5 / 3, 15);
    expect(NAMED_GASES['carbon-dioxide'].gamma).toBe(1.289);
  });
});
