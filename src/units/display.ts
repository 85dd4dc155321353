/**
 * SI numbers → engineering units for people (tables, messages). Machine outputs stay SI.
 */

export type DisplayKind = 'pressure' | 'gauge' | 'volume' | 'mass' | 'temperature' | 'stretch' | 'flow' | 'reynolds' | 'time' | 'position' | 'velocity' | 'energy' | 'opening';

const TINY: Record<DisplayKind, number> = {
  pressure: 1e-6, gauge: 1e-6, volume: 1e-15, mass: 1e-15, temperature: 0, stretch: 1e-12, flow: 1e-15, reynolds: 1e-9, time: 1e-12,
  position: 1e-12, velocity: 1e-12, energy: 1e-12, opening: 1e-12,
};

function sig(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const s = x.toPrecision(digits);
  return s.includes('e') ? s : String(Number(s));
}

/** A value with a unit chosen for its size: kPa, mL/L, g/kg, g/s, °C, ms/s. */
export function display(value: number, kind: DisplayKind): string {
  // round-off residue (a gauge of 1e-13 Pa) reads as zero
  if (Math.abs(value) < TINY[kind]) value = 0;
  const a = Math.abs(value);
  switch (kind) {
    case 'pressure': return `${sig(value / 1000)} kPa abs`;
    case 'gauge': return `${sig(value / 1000)} kPa gauge`;
    case 'volume': return a < 1e-3 ? `${sig(value * 1e6)} mL` : `${sig(value * 1e3)} L`;
    case 'mass': return a < 1 ? `${sig(value * 1e3)} g` : `${sig(value)} kg`;
    case 'temperature': return `${sig(value - 273.15)} °C`;
    case 'flow': return a < 1 ? `${sig(value * 1e3)} g/s` : `${sig(value)} kg/s`;
    case 'time': return a < 1 && a > 0 ? `${sig(value * 1e3)} ms` : `${sig(value)} s`;
    case 'opening': return `${sig(value * 100)} %`;
    case 'position': return a < 1 ? `${sig(value * 1e3)} mm` : `${sig(value)} m`;
    case 'velocity': return `${sig(value)} m/s`;
    case 'energy': return `${sig(value)} J`;
    case 'stretch':
    case 'reynolds':
      return sig(value);
  }
}

export { sig as significant };

/** An axis unit: shown value = SI value × factor + offset. */
export interface DisplayScale { unit: string; factor: number; offset: number }

/**
 * The unit `display` chooses for values up to `magnitude` (SI), for a whole axis or column,
 * so that a plot and the table beside it speak the same units.
 */
export function displayScale(kind: DisplayKind, magnitude: number): DisplayScale {
  const a = Math.abs(magnitude);
  switch (kind) {
    case 'pressure': return { unit: 'kPa abs', factor: 1e-3, offset: 0 };
    case 'gauge': return { unit: 'kPa gauge', factor: 1e-3, offset: 0 };
    case 'volume': return a < 1e-3 ? { unit: 'mL', factor: 1e6, offset: 0 } : { unit: 'L', factor: 1e3, offset: 0 };
    case 'mass': return a < 1 ? { unit: 'g', factor: 1e3, offset: 0 } : { unit: 'kg', factor: 1, offset: 0 };
    case 'temperature': return { unit: '°C', factor: 1, offset: -273.15 };
    case 'flow': return a < 1 ? { unit: 'g/s', factor: 1e3, offset: 0 } : { unit: 'kg/s', factor: 1, offset: 0 };
    case 'time': return a < 1 && a > 0 ? { unit: 'ms', factor: 1e3, offset: 0 } : { unit: 's', factor: 1, offset: 0 };
    case 'opening': return { unit: '%', factor: 100, offset: 0 };
    case 'position': return a < 1 ? { unit: 'mm', factor: 1e3, offset: 0 } : { unit: 'm', factor: 1, offset: 0 };
    case 'velocity': return { unit: 'm/s', factor: 1, offset: 0 };
    case 'energy': return { unit: 'J', factor: 1, offset: 0 };
    case 'stretch':
    case 'reynolds':
      return { unit: '', factor: 1, offset: 0 };
  }
}
