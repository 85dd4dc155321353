/**
 * fast-check generators of netlists: valid networks (every wall law in sensible ranges, lines
 * and valves of every kind joining them, reservoirs of every form, feeds, short durations)
 * written as YAML text, and mutations that damage such a text the way people and tools do.
 *
 * The ranges are invented for test scenarios (rubber cells, small tanks, pneumatic tubing),
 * chosen so that every generated netlist is valid: e.g. a linear wall's compliance stays below
 * V0/p_ambient, a Gent start stretch below 0.9 of its lock.
 */
import fc from 'fast-check';

/** A number as written in a netlist: a few digits, and no denormal dust (|x| < 1e-6 is 0). */
const num = (x: number, digits = 4): string => (Math.abs(x) < 1e-6 ? '0' : String(Number(x.toPrecision(digits))));
const float = (min: number, max: number): fc.Arbitrary<number> => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

/** Lock stretch of a Gent sphere: root λ > 1 of 2λ² + λ⁻⁴ − 3 = Jm (Gent 1996). */
function gentLock(jm: number): number {
  let lo = 1;
  let hi = Math.sqrt((jm + 3) / 2) + 1;
  for (let i = 0; i < 100; i++) {
    const mid = 0.5 * (lo + hi);
    if (2 * mid * mid + mid ** -4 - 3 - jm > 0) hi = mid; else lo = mid;
  }
  return lo;
}

const sphereBase = fc.record({ radius: float(10, 50), thickness: float(0.5, 2) });

/** A chamber's body (everything but its name), as a YAML flow mapping. */
export const chamberBody: fc.Arbitrary<string> = fc.oneof(
  fc.record({ V: float(0.01, 10), p: float(-50, 500) })
    .map(({ V, p }) => `wall: rigid, volume: ${num(V)} L, start: { pressure: ${num(p)} kPa gauge }`),
  fc.record({ V: float(0.05, 5), k: float(0.01, 0.5), p: float(0, 300) })
    .map(({ V, k, p }) => `wall: linear, volume: ${num(V)} L, compliance: ${num(k * V)} L/bar, start: { pressure: ${num(p)} kPa gauge }`),
  fc.record({ s: sphereBase, mu: float(0.2, 1), l: float(1, 2) })
    .map(({ s, mu, l }) => `wall: neo-hookean, radius: ${num(s.radius)} mm, thickness: ${num(s.thickness)} mm, shear-modulus: ${num(mu)} MPa, start: { stretch: ${num(l)} }`),
  fc.record({ s: sphereBase, c1: float(0.1, 0.5), c2: float(0, 0.05), l: float(1, 2) })
    .map(({ s, c1, c2, l }) => `wall: mooney-rivlin, radius: ${num(s.radius)} mm, thickness: ${num(s.thickness)} mm, c1: ${num(c1)} MPa, c2: ${num(c2)} MPa, start: { stretch: ${num(l)} }`),
  fc.record({ s: sphereBase, mu: float(0.2, 1), jm: float(20, 100), f: float(0, 1) })
    .map(({ s, mu, jm, f }) => {
      const l = 1 + f * (Math.min(2, 0.9 * gentLock(jm)) - 1);
      return `wall: gent, radius: ${num(s.radius)} mm, thickness: ${num(s.thickness)} mm, shear-modulus: ${num(mu)} MPa, limit: ${num(jm)}, start: { stretch: ${num(l, 6)} }`;
    }),
  fc.record({ V1: float(0.1, 0.5), dV: fc.array(float(0.1, 1), { minLength: 2, maxLength: 5 }), dp: fc.array(float(0.2, 5), { minLength: 5, maxLength: 5 }), f: float(0, 1) })
    .map(({ V1, dV, dp, f }) => {
      let V = V1;
      let p = 0;
      const pts = [[V, p]];
      dV.forEach((d, i) => { V += d; p += dp[i]; pts.push([V, p]); });
      // below the top point: the curve may end flat, and its top pressure has no single volume
      const start = 0.95 * f * p;
      return `wall: measured, points: [${pts.map(([v, q]) => `[${num(v)} L, ${num(q)} kPa]`).join(', ')}], start: { pressure: ${num(start)} kPa gauge }`;
    }),
);

/** Flow rating and opening of a valve. */
const valveRating = fc.oneof(
  fc.record({ d: float(0.3, 3), cd: float(0.5, 0.95) }).map(({ d, cd }) => `orifice: ${num(d)} mm, discharge-coefficient: ${num(cd)}`),
  fc.record({ c: float(0.05, 2), b: float(0.1, 0.6) }).map(({ c, b }) => `conductance: ${num(c)} L/(s*bar), critical-ratio: ${num(b)}`),
);

const valveOpening = (duration: number): fc.Arbitrary<string> => fc.oneof(
  fc.constantFrom('initially: open', 'initially: closed', 'initially: 40%'),
  fc.record({ at: float(0, 0.9), over: float(0, 0.2), to: fc.integer({ min: 0, max: 100 }) })
    .map(({ at, over, to }) => `schedule: [{ at: ${num(at * duration * 1000)} ms, open: ${to}%, over: ${num(over * duration * 1000)} ms }]`),
  float(0, 20).map((c) => `check: { cracking: ${num(c)} kPa }`),
  fc.record({ open: float(20, 300), band: float(2, 50) })
    .map(({ open, band }) => `relief: { opens-above: ${num(open)} kPa gauge, reseats-below: ${num(Math.max(open - band, 1))} kPa gauge }`),
);

const lineBody = fc.record({ d: float(0.5, 4), l: float(0.05, 2) }).map(({ d, l }) => `diameter: ${num(d)} mm, length: ${num(l)} m`);

/** A link between two nodes: a line, a valve, or a valve inside a line. */
const link = (duration: number): fc.Arbitrary<{ kind: 'line' | 'valve' | 'both'; line: string; valve: string }> =>
  fc.record({ kind: fc.constantFrom('line' as const, 'valve' as const, 'both' as const), line: lineBody, valve: fc.tuple(valveRating, valveOpening(duration)).map(([r, o]) => `${r}, ${o}`) });

const reservoirPressure = (duration: number): fc.Arbitrary<string> => fc.oneof(
  float(0, 600).map((p) => `${num(p)} kPa gauge`),
  fc.array(float(0, 400), { minLength: 1, maxLength: 4 })
    .map((ps) => `[${ps.map((p, i) => `[${num((i * duration * 1000) / ps.length)} ms, ${num(p)} kPa gauge]`).join(', ')}]`),
  fc.record({ mean: float(50, 300), amp: float(0, 50), period: float(5, 100) })
    .map(({ mean, amp, period }) => `"${num(mean)} kPa + ${num(amp)} kPa * sin(2*pi*t/(${num(period)} ms)) gauge"`),
);

export interface GeneratedNetlist { text: string; chambers: number }

/** A valid netlist: a chain of chambers, a supply at its head, optional vent and feed. */
export const validNetlist: fc.Arbitrary<GeneratedNetlist> = fc.record({
  duration: float(0.02, 0.3),
  heat: fc.constantFrom('isothermal', 'adiabatic', 'exchange'),
  method: fc.constantFrom('auto', 'explicit', 'implicit'),
  n: fc.integer({ min: 1, max: 4 }),
}).chain(({ duration, heat, method, n }) => fc.record({
  duration: fc.constant(duration), heat: fc.constant(heat), method: fc.constant(method),
  chambers: fc.array(chamberBody, { minLength: n, maxLength: n }),
  ht: fc.array(float(0.1, 5), { minLength: n, maxLength: n }),
  links: fc.array(link(duration), { minLength: n - 1, maxLength: n - 1 }),
  supply: fc.option(fc.record({ p: reservoirPressure(duration), link: link(duration) }), { nil: undefined }),
  vent: fc.option(fc.tuple(valveRating, valveOpening(duration)).map(([r, o]) => `${r}, ${o}`), { nil: undefined }),
  feed: fc.option(fc.record({ into: fc.nat(n - 1), rate: float(0.01, 0.5), anr: fc.boolean() }), { nil: undefined }),
})).map((g) => {
  const n = g.chambers.length;
  const out = ['format: 1', 'title: generated network', `heat: ${g.heat}`, 'chambers:'];
  g.chambers.forEach((c, i) => out.push(`  c${i}: { ${c}${g.heat === 'exchange' ? `, heat-transfer: ${num(g.ht[i])} W/K` : ''} }`));
  const lines: string[] = [];
  const valves: string[] = [];
  const join = (name: string, from: string, to: string, l: { kind: string; line: string; valve: string }): void => {
    if (l.kind === 'line') lines.push(`  ${name}: { from: ${from}, to: ${to}, ${l.line} }`);
    else if (l.kind === 'valve') valves.push(`  ${name}: { from: ${from}, to: ${to}, ${l.valve} }`);
    else {
      lines.push(`  ${name}: { from: ${from}, to: ${to}, ${l.line} }`);
      valves.push(`  ${name}_v: { in-line: ${name}, ${l.valve} }`);
    }
  };
  g.links.forEach((l, i) => join(`link${i}`, `c${i}`, `c${i + 1}`, l));
  if (g.supply) {
    out.push('reservoirs:', `  supply: { pressure: ${g.supply.p} }`);
    join('supply_link', 'supply', 'c0', g.supply.link);
  }
  if (g.vent) valves.push(`  vent: { from: c${n - 1}, to: ambient, ${g.vent} }`);
  // a single chamber with nothing else gets a feed, so that it is connected
  const feed = g.feed ?? (n === 1 && !g.supply && !g.vent ? { into: 0, rate: 0.05, anr: false } : undefined);
  if (lines.length) out.push('lines:', ...lines);
  if (valves.length) out.push('valves:', ...valves);
  if (feed) {
    const rate = feed.anr ? `${num(feed.rate * 50)} L/min ANR` : `${num(feed.rate)} g/s`;
    out.push('feeds:', `  pump: { into: c${Math.min(feed.into, n - 1)}, rate: ${rate} }`);
  }
  out.push(`simulate: { duration: ${num(g.duration * 1000)} ms, sample: ${num(g.duration * 10)} ms, method: ${g.method}, max-wall: 10 s }`);
  return { text: out.join('\n') + '\n', chambers: n };
});

// ---- mutations ------------------------------------------------------------------------------

/** Values people and tools put where they do not belong. */
const GARBAGE = [
  '', '~', 'null', '0', '-1', '1e400', '-1e400', '.nan', '.inf', '1e-400 m', 'NaN kPa gauge', '[]', '{}', '[[]]',
  '"', "'", '&a x', '*a', '!!binary AAAA', '!python/object x', 'abc', 'kPa gauge', '5 kPa', '-5 mm', '1e30 m^3',
  'yes', 'NO', '0x1F', '1_000', '"1 kPa * t.constructor gauge"', '"import({}) abs"', '- x', '{ a: 1, a: 2 }',
  '200 kPa abs gauge', '3 parsecs', '20 C', '10 L/min', '1 ms', '1 L', '1 kg', '101%', '-1%', 'x'.repeat(300),
];

/** Unit spellings swapped for one another: a length for a time, a pressure for a volume... */
const UNITS = ['mm', 'm', 'L', 'mL', 'kPa', 'MPa', 'bar', 's', 'ms', 'g/s', 'W/K', 'L/bar', 'degC', 'K', 'L/min', 'psi', 'kg', 'um'];

export type Mutation =
  | { op: 'delete-line'; at: number }
  | { op: 'duplicate-line'; at: number }
  | { op: 'garbage-value'; at: number; garbage: number }
  | { op: 'delete-entry'; at: number }
  | { op: 'swap-unit'; at: number; unit: number }
  | { op: 'insert-junk'; at: number; junk: string }
  | { op: 'indent'; at: number; by: number };

export const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ op: fc.constant('delete-line' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('duplicate-line' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('garbage-value' as const), at: fc.nat(), garbage: fc.nat(GARBAGE.length - 1) }),
  fc.record({ op: fc.constant('delete-entry' as const), at: fc.nat() }),
  fc.record({ op: fc.constant('swap-unit' as const), at: fc.nat(), unit: fc.nat(UNITS.length - 1) }),
  fc.record({ op: fc.constant('insert-junk' as const), at: fc.nat(), junk: fc.string({ maxLength: 6 }) }),
  fc.record({ op: fc.constant('indent' as const), at: fc.nat(), by: fc.integer({ min: -4, max: 4 }) }),
);

/** The positions of every match of `re` in `text`. */
function matches(text: string, re: RegExp): RegExpExecArray[] {
  return [...text.matchAll(new RegExp(re.source, 'g'))];
}

/** Applies one mutation; a mutation with nothing to act on leaves the text as it is. */
export function mutate(text: string, m: Mutation): string {
  const lines = text.split('\n');
  switch (m.op) {
    case 'delete-line':
      lines.splice(m.at % lines.length, 1);
      return lines.join('\n');
    case 'duplicate-line': {
      const i = m.at % lines.length;
      lines.splice(i, 0, lines[i]);
      return lines.join('\n');
    }
    case 'indent': {
      const i = m.at % lines.length;
      lines[i] = m.by >= 0 ? ' '.repeat(m.by) + lines[i] : lines[i].slice(Math.min(-m.by, lines[i].length - lines[i].trimStart().length));
      return lines.join('\n');
    }
    case 'insert-junk': {
      const at = m.at % (text.length + 1);
      return text.slice(0, at) + m.junk + text.slice(at);
    }
    case 'garbage-value': {
      // a scalar value after `key: ` up to the next `,` `}` or end of line
      const ms = matches(text, /(?<=: )[^,{}\[\]\n]+/);
      if (!ms.length) return text;
      const x = ms[m.at % ms.length];
      return text.slice(0, x.index) + GARBAGE[m.garbage] + text.slice(x.index + x[0].length);
    }
    case 'delete-entry': {
      // `key: value, ` inside a flow mapping
      const ms = matches(text, /[\w-]+: [^,{}\[\]\n]+(, |(?= }))/);
      if (!ms.length) return text;
      const x = ms[m.at % ms.length];
      return text.slice(0, x.index) + text.slice(x.index + x[0].length);
    }
    case 'swap-unit': {
      const ms = matches(text, /(?<=\d )(?:mm|m|L|kPa|MPa|bar|s|ms|g\/s|W\/K|L\/bar|L\/min|L\/\(s\*bar\))(?=[ ,}\]\n])/);
      if (!ms.length) return text;
      const x = ms[m.at % ms.length];
      return text.slice(0, x.index) + UNITS[m.unit] + text.slice(x.index + x[0].length);
    }
  }
}
