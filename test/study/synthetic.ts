/**
 * Synthetic bench data for fit tests and the example file networks/data/: readings of a thin
 * rubber sphere's gauge pressure from the laws in physics/membrane.ts, with seeded normal
 * noise on the pressure. Invented numbers, for demos and tests only.
 */
import { membranePressure, type Membrane } from '../../src/physics/membrane.js';
import { caseStream } from '../../src/studies/rng.js';

export interface SyntheticOptions {
  seed: number;
  /** Standard deviation of the pressure noise, Pa. */
  noise: number;
  /** Readings on the way up (and as many on the way down when deflation is given). */
  readings: number;
  /** Largest stretch reached. */
  lambdaMax: number;
  /** Deflation curve = this factor × the law (hysteresis); none when undefined. */
  deflation?: number;
  size: 'volume' | 'stretch';
  /** Comment lines (without `#`). */
  comments?: string[];
}

function fmt(x: number, digits: number): string {
  return String(Number(x.toPrecision(digits)));
}

export function syntheticBench(law: Membrane, o: SyntheticOptions): string {
  const rng = caseStream(o.seed, 0);
  const V0 = (4 / 3) * Math.PI * law.r0 ** 3;
  const lines = (o.comments ?? []).map((c) => `# ${c}`);
  lines.push(o.size === 'volume' ? 'volume [mL],gauge [kPa]' : 'stretch [-],gauge [kPa]');
  const row = (l: number, factor: number): string => {
    const p = factor * membranePressure(law, l).dp + o.noise * rng.normal();
    const size = o.size === 'volume' ? fmt(V0 * l ** 3 * 1e6, 7) : fmt(l, 7);
    return `${size},${fmt(p / 1000, 6)}`;
  };
  const n = o.readings;
  for (let i = 0; i < n; i++) lines.push(row(1 + ((o.lambdaMax - 1) * i) / (n - 1), 1));
  if (o.deflation !== undefined) for (let i = n - 2; i >= 0; i--) lines.push(row(1 + ((o.lambdaMax - 1) * i) / (n - 1), o.deflation));
  return lines.join('\n') + '\n';
}

/** The example file networks/data/latex-cell-bench-synthetic.csv and what made it. */
export const EXAMPLE_LAW: Membrane = { kind: 'gent', r0: 0.04, t0: 0.0015, mu: 0.42e6, jm: 35 };
export const EXAMPLE_DEFLATION = 0.88;
export function exampleBench(): string {
  return syntheticBench(EXAMPLE_LAW, {
    seed: 2024, noise: 150, readings: 60, lambdaMax: 3.2, deflation: EXAMPLE_DEFLATION, size: 'volume',
    comments: [
      'SYNTHETIC bench data (invented for the plenum examples, not a measurement).',
      'A latex cushion cell, unstretched radius 40 mm, wall 1.5 mm, inflated to stretch 3.2 and deflated again.',
      'Made from the Gent law with shear modulus 0.42 MPa and limit Jm = 35; the deflation curve is 0.88 x the',
      'inflation curve (hysteresis); normal noise of 0.15 kPa on the pressure (seed 2024).',
      'Regenerate with test/study/synthetic.ts (exampleBench). Fit with:',
      '  plenum fit networks/data/latex-cell-bench-synthetic.csv --wall gent --radius 40mm --thickness 1.5mm',
    ],
  });
}
