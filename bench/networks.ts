/**
 * Generated benchmark networks, written as netlist YAML so that a run includes reading and
 * checking the text exactly as a user's run does. Three shapes, each with mixed walls, lines and
 * one scheduled valve event:
 *
 * - chain: alternating rigid 20 mL tanks and neo-Hookean pods (r0 15 mm, t0 1 mm, μ 0.3 MPa,
 *   starting at stretch 1.05) joined by laminar lines 2 mm × 100 mm, isothermal, 1 s; the same
 *   chain as the SciPy anchor (/work/shared/anchors/scipy_chain.py), plus a vent valve at the far
 *   end that opens at 0.5 s.
 * - grid: a manifold grid, rows of cells fed by a manifold of rigid segments; the row manifolds
 *   hang off a header that a supply reaches through a valve opening at 0.1 s. Cells alternate
 *   between linear (air spring) and Mooney–Rivlin walls.
 * - star: one rigid tank with every other chamber on its own line around it (a dense row and
 *   column in the jacobian), pods and linear cells, filled through a valve opening at 0.1 s.
 *
 * - relief (event-heavy, for the stiff integrators' restarts; not in `npm run bench`'s default
 *   shapes): the chain's tanks and pods, fed at one end through a valve that a schedule opens
 *   and closes every 100 ms (40 ramp ends, each a breakpoint), with a relief valve venting every
 *   tenth chamber (opens above 30 kPa gauge, reseats below 20 kPa gauge: each cycle opens and
 *   reseats them), 2 s.
 *
 * The numbers are a demo scenario, not measurements.
 */

export type NetworkShape = 'chain' | 'grid' | 'star' | 'relief';

export interface NetworkOptions {
  /** Output sample interval, e.g. "10 ms". */
  sample?: string;
  tolerance?: number;
  duration?: string;
  method?: 'auto' | 'explicit' | 'implicit';
  heat?: 'isothermal' | 'adiabatic';
}

function simulateLine(o: NetworkOptions, duration: string): string {
  const parts = [`duration: ${o.duration ?? duration}`, `sample: ${o.sample ?? '10 ms'}`, `tolerance: ${o.tolerance ?? 1e-6}`];
  if (o.method) parts.push(`method: ${o.method}`);
  return `simulate: { ${parts.join(', ')} }\n`;
}

function header(title: string, o: NetworkOptions): string {
  return `format: 1\ntitle: ${title}\nambient: { pressure: 101.325 kPa, temperature: 20 degC }\nheat: ${o.heat ?? 'isothermal'}\n`;
}

const POD = 'wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa';
const TANK = 'wall: rigid, volume: 20 mL';

/** A chain of n chambers (the anchor's chain plus a vent valve at the far end opening at 0.5 s). */
export function chainNetlist(n: number, o: NetworkOptions = {}): string {
  const out: string[] = [header(`Generated chain of ${n} chambers`, o), 'chambers:\n'];
  for (let i = 0; i < n; i++) {
    out.push(i % 2 === 1
      ? `  c${i}: { ${POD}, start: { stretch: 1.05 } }\n`
      : `  c${i}: { ${TANK}, start: { pressure: 0 kPa gauge } }\n`);
  }
  out.push('lines:\n');
  for (let i = 0; i + 1 < n; i++) out.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
  out.push('valves:\n');
  out.push(`  vent: { from: c${n - 1}, to: ambient, orifice: 0.5 mm, discharge-coefficient: 0.65, initially: closed, schedule: [ { at: 0.5 s, open: 100%, over: 10 ms } ] }\n`);
  out.push(simulateLine(o, '1 s'));
  return out.join('');
}

/**
 * A manifold grid of about n chambers: rows of `w` cells, each cell on its own manifold
 * segment; segment k of a row joins segment k+1; the first segment of each row joins a header
 * segment; header segments form a chain fed from a supply through a valve.
 */
export function gridNetlist(n: number, o: NetworkOptions = {}): string {
  // chambers = rows·(2w + 1): w cells + w manifold segments + 1 header segment per row
  const w = Math.max(1, Math.round(Math.sqrt(n / 2)));
  const rows = Math.max(1, Math.round(n / (2 * w + 1)));
  const out: string[] = [header(`Generated manifold grid of ${rows} × ${w} cells`, o)];
  out.push('reservoirs:\n  supply: { pressure: 150 kPa gauge }\n');
  out.push('chambers:\n');
  const lines: string[] = [];
  for (let r = 0; r < rows; r++) {
    out.push(`  h${r}: { wall: rigid, volume: 10 mL, start: { pressure: 0 kPa gauge } }\n`);
    if (r > 0) lines.push(`  hh${r}: { from: h${r - 1}, to: h${r}, diameter: 6 mm, length: 50 mm }\n`);
    for (let k = 0; k < w; k++) {
      out.push(`  m${r}_${k}: { wall: rigid, volume: 5 mL, start: { pressure: 0 kPa gauge } }\n`);
      out.push((r + k) % 2 === 0
        ? `  a${r}_${k}: { wall: linear, volume: 30 mL, compliance: 0.2 mL/kPa, start: { pressure: 0 kPa gauge } }\n`
        : `  a${r}_${k}: { wall: mooney-rivlin, radius: 12 mm, thickness: 1.2 mm, c1: 0.4 MPa, c2: 0.04 MPa, start: { stretch: 1.0 } }\n`);
      lines.push(k === 0
        ? `  hm${r}: { from: h${r}, to: m${r}_0, diameter: 4 mm, length: 40 mm }\n`
        : `  mm${r}_${k}: { from: m${r}_${k - 1}, to: m${r}_${k}, diameter: 4 mm, length: 30 mm }\n`);
      lines.push(`  ma${r}_${k}: { from: m${r}_${k}, to: a${r}_${k}, diameter: 1.5 mm, length: 80 mm }\n`);
    }
  }
  out.push('lines:\n', ...lines);
  out.push('valves:\n');
  out.push('  inlet: { from: supply, to: h0, conductance: 2 L/(s*bar), critical-ratio: 0.3, initially: closed, schedule: [ { at: 0.1 s, open: 100%, over: 20 ms } ] }\n');
  out.push(simulateLine(o, '1 s'));
  return out.join('');
}

/** A star: one hub tank and n − 1 chambers each on its own line to it, filled through a valve. */
export function starNetlist(n: number, o: NetworkOptions = {}): string {
  const out: string[] = [header(`Generated star of ${n} chambers around a tank`, o)];
  out.push('reservoirs:\n  supply: { pressure: 100 kPa gauge }\n');
  out.push('chambers:\n');
  out.push(`  hub: { wall: rigid, volume: ${Math.max(0.1, n * 0.02)} L, start: { pressure: 0 kPa gauge } }\n`);
  const lines: string[] = [];
  for (let i = 1; i < n; i++) {
    out.push(i % 2 === 1
      ? `  s${i}: { ${POD}, start: { stretch: 1.0 } }\n`
      : `  s${i}: { wall: linear, volume: 25 mL, compliance: 0.1 mL/kPa, start: { pressure: 0 kPa gauge } }\n`);
    lines.push(`  r${i}: { from: hub, to: s${i}, diameter: 2 mm, length: ${100 + (i % 7) * 20} mm }\n`);
  }
  out.push('lines:\n', ...lines);
  out.push('valves:\n');
  out.push(`  fill: { from: supply, to: hub, conductance: ${Math.max(1, n / 100)} L/(s*bar), critical-ratio: 0.3, initially: closed, schedule: [ { at: 0.1 s, open: 100%, over: 20 ms } ] }\n`);
  out.push(simulateLine(o, '1 s'));
  return out.join('');
}

export function netlistFor(shape: NetworkShape, n: number, o: NetworkOptions = {}): string {
  switch (shape) {
    case 'chain': return chainNetlist(n, o);
    case 'grid': return gridNetlist(n, o);
    case 'star': return starNetlist(n, o);
    case 'relief': return reliefNetlist(n, o);
  }
}

/** The event-heavy chain: a pulsed supply and relief valves on every tenth chamber (see the module comment). */
export function reliefNetlist(n: number, o: NetworkOptions = {}): string {
  const out: string[] = [header(`Generated chain of ${n} chambers with relief valves and a pulsed supply`, o)];
  out.push('reservoirs:\n  supply: { pressure: 100 kPa gauge }\n');
  out.push('chambers:\n');
  for (let i = 0; i < n; i++) {
    out.push(i % 2 === 1
      ? `  c${i}: { ${POD}, start: { stretch: 1.05 } }\n`
      : `  c${i}: { ${TANK}, start: { pressure: 0 kPa gauge } }\n`);
  }
  out.push('lines:\n');
  for (let i = 0; i + 1 < n; i++) out.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
  out.push('valves:\n');
  const pulses: string[] = [];
  for (let k = 0; k < 10; k++) pulses.push(`{ at: ${0.1 + 0.2 * k} s, open: 100%, over: 5 ms }`, `{ at: ${0.2 + 0.2 * k} s, open: 0%, over: 5 ms }`);
  out.push(`  feed: { from: supply, to: c0, conductance: 2 L/(s*bar), critical-ratio: 0.3, initially: closed, schedule: [ ${pulses.join(', ')} ] }\n`);
  for (let i = 0; i < n; i += 10) {
    out.push(`  r${i}: { from: c${i}, to: ambient, orifice: 0.5 mm, discharge-coefficient: 0.6, relief: { opens-above: 30 kPa gauge, reseats-below: 20 kPa gauge } }\n`);
  }
  out.push(simulateLine(o, '2 s'));
  return out.join('');
}

/**
 * A closed chain of n identical linear chambers (air springs: 30 mL, 0.2 mL/kPa, at 20 kPa
 * gauge) joined by identical laminar lines 2 mm × 100 mm, for `plenum equilibria` and
 * `plenum trace` at scale: every rest state has one pressure, and the linearisation is a
 * path-graph Laplacian (eigenvalues −(G/C)·(2 − 2 cos(kπ/n)), k = 0 … n − 1).
 */
export function linearChainNetlist(n: number, o: NetworkOptions = {}): string {
  const out: string[] = [header(`Generated closed chain of ${n} linear chambers`, o), 'chambers:\n'];
  for (let i = 0; i < n; i++) out.push(`  c${i}: { wall: linear, volume: 30 mL, compliance: 0.2 mL/kPa, start: { pressure: 20 kPa gauge } }\n`);
  out.push('lines:\n');
  for (let i = 0; i + 1 < n; i++) out.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
  out.push(simulateLine(o, '1 s'));
  return out.join('');
}

/**
 * A closed chain of n identical neo-Hookean spheres (r0 15 mm, t0 1 mm, μ 0.3 MPa) joined by
 * laminar lines 2 mm × 100 mm, alternately started at stretch 1.2 and 1.6 (either side of the
 * pressure maximum at 7^(1/6) = 1.383): each sphere has two branches at a pressure below the
 * maximum, so the group has 2^n branch combinations.
 */
export function sphereChainNetlist(n: number, o: NetworkOptions = {}): string {
  const out: string[] = [header(`Generated closed chain of ${n} elastic spheres`, o), 'chambers:\n'];
  for (let i = 0; i < n; i++) out.push(`  s${i}: { ${POD}, start: { stretch: ${i % 2 === 0 ? 1.2 : 1.6} } }\n`);
  out.push('lines:\n');
  for (let i = 0; i + 1 < n; i++) out.push(`  l${i}: { from: s${i}, to: s${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
  out.push(simulateLine(o, '1 s'));
  return out.join('');
}
