/**
 * Chambers: wall law and its parameters (beside `wall:` in the chamber's mapping), start
 * state, limits and heat transfer.
 *
 * fieldPos keys: `wall` (the law name), `wall.<param>` for law parameters, `start.<key>`,
 * `limits.<key>`, `temperature`, `heat-transfer`.
 */
import { listChoices } from '../diag/did-you-mean.js';
import { parsePressure, splitQualifier, MAX_GAS_PRESSURE, aboveMaxPressure } from '../units/pressure.js';
import { parseQuantity } from '../units/quantity.js';
import type { Checker, Where } from './checker.js';
import { CHAMBER, LIMITS, SPHERE_LAWS, START, WALL_LAWS, wallLaw } from './kinds.js';
import type { NameEntry } from './names.js';
import type { ChamberSpec, SourcePos, StartSpec, WallSpec } from './types.js';
import type { YMap, YNode } from './yaml-types.js';

const START_KEYS = ['pressure', 'stretch', 'volume', 'mass'] as const;
const POINTS_HINT = 'each point is [volume, gauge pressure], e.g. `[0.5 L, 2 kPa]`';
/** Beyond this t0/r0 the thin-wall sphere laws are a poor approximation (common practice). */
const THIN_WALL_RATIO = 0.1;

export interface ChamberContext {
  heat: 'isothermal' | 'adiabatic' | 'exchange';
}

function isSphere(law: string): boolean {
  return (SPHERE_LAWS as readonly string[]).includes(law);
}

/**
 * The stretch at which a Gent sphere locks: the root λ > 1 of 2λ² + λ⁻⁴ − 3 = Jm
 * (the left side increases for λ > 1). Bisection to round-off.
 * References: Gent, Rubber Chem. Technol. 69 (1996) 59 (I1 = 2λ² + λ⁻⁴ for equibiaxial stretch).
 */
export function gentLockStretch(Jm: number): number {
  const g = (l: number): number => 2 * l * l + l ** -4 - 3 - Jm;
  let lo = 1;
  let hi = Math.sqrt((Jm + 3) / 2) + 1;
  for (let i = 0; i < 200 && hi - lo > 1e-15 * hi; i++) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) > 0) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/** Unstretched volume (4/3)π r0³ of a sphere law, m³. */
function sphereVolume(wall: WallSpec): number | undefined {
  return 'radius' in wall ? (4 / 3) * Math.PI * wall.radius ** 3 : undefined;
}

function readPoints(ck: Checker, node: YNode, what: string): [number, number][] | undefined {
  const seq = ck.seq(node, what, POINTS_HINT);
  if (!seq) return undefined;
  const points: [number, number][] = [];
  let ok = true;
  seq.items.forEach((row, i) => {
    if (row.kind !== 'seq' || row.items.length !== 2) {
      ck.error(row, 'wrong-type', `point ${i + 1} of ${what} must be a pair [volume, gauge pressure]`, POINTS_HINT);
      ok = false;
      return;
    }
    const [vn, pn] = row.items;
    const V = readPointVolume(ck, vn, pn, i + 1);
    const p = readPointPressure(ck, pn, i + 1);
    if (V === undefined || p === undefined) {
      ok = false;
      return;
    }
    if (p + ck.ambientPa <= 0) {
      ck.error(pn, 'out-of-range', `the pressure of point ${i + 1} is at or below vacuum (${(p / 1000).toPrecision(4)} kPa gauge against an ambient of ${(ck.ambientPa / 1000).toPrecision(4)} kPa)`, 'a measured curve gives gauge pressures above vacuum, i.e. above minus the ambient pressure');
      ok = false;
      return;
    }
    if (points.length && V <= points[points.length - 1][0]) {
      ck.error(vn, 'table-order', `the volume of point ${i + 1} is not larger than the previous point's`, 'volumes must be strictly increasing');
      ok = false;
      return;
    }
    points.push([V, p]);
  });
  if (ok && points.length < 3) {
    ck.error(seq, 'too-few-points', `${what} has ${points.length} point${points.length === 1 ? '' : 's'}; at least 3 are needed`, POINTS_HINT);
    return undefined;
  }
  return ok ? points : undefined;
}

function readPointVolume(ck: Checker, vn: YNode, pn: YNode, index: number): number | undefined {
  const v = ck.scalar(vn, `the volume of point ${index}`, POINTS_HINT);
  if (v === undefined) return undefined;
  const r = parseQuantity(v, 'volume');
  if (!r.ok && r.code === 'unit-dimension') {
    const other = pn.kind === 'scalar' && (typeof pn.value === 'string' || typeof pn.value === 'number') ? parseQuantity(pn.value, 'volume') : undefined;
    const swapped = other?.ok ? ' (the entries look swapped)' : '';
    ck.error(vn, 'unit-dimension', `point ${index}: ${r.message}${swapped}`, POINTS_HINT);
    return undefined;
  }
  return ck.checked(vn, r, `the volume of point ${index}`, { gt: 0 }, 'm³');
}

/** A gauge pressure of a measured curve: plain (gauge by definition), `gauge` or `abs`. */
function readPointPressure(ck: Checker, pn: YNode, index: number): number | undefined {
  const v = ck.scalar(pn, `the pressure of point ${index}`, POINTS_HINT);
  if (v === undefined) return undefined;
  const reference = typeof v === 'string' ? splitQualifier(v).reference : undefined;
  if (reference) {
    const r = parsePressure(v, ck.ambientPa);
    return ck.checked(pn, r.ok ? { ok: true, value: r.gauge } : r, `the pressure of point ${index}`);
  }
  const r = parseQuantity(v, 'pressure');
  if (!r.ok && r.code === 'unit-dimension') {
    ck.error(pn, 'unit-dimension', `point ${index}: ${r.message}`, POINTS_HINT);
    return undefined;
  }
  // the same highest pressure as every gas pressure (a gauge value plus the ambient)
  return ck.checked(pn, r.ok && r.value + ck.ambientPa > MAX_GAS_PRESSURE ? aboveMaxPressure(String(v)) : r, `the pressure of point ${index}`);
}

function readWall(ck: Checker, map: YMap, law: string, fieldPos: Record<string, SourcePos>): WallSpec | undefined {
  const table = wallLaw(law);
  if (!table) return undefined;
  const v = ck.params(map, table.params);
  for (const p of table.params) {
    const node = ck.get(map, p.name);
    if (node) fieldPos[`wall.${p.name}`] = ck.sourcePos(node);
  }
  const num = (k: string): number => v[k] as number;
  if (table.params.some((p) => p.dimension !== 'structure' && p.required && v[p.name] === undefined)) return undefined;
  switch (law) {
    case 'rigid':
      return { law, volume: num('volume') };
    case 'linear':
      return { law, volume: num('volume'), compliance: num('compliance') };
    case 'neo-hookean':
      return { law, radius: num('radius'), thickness: num('thickness'), shearModulus: num('shear-modulus') };
    case 'mooney-rivlin':
      return { law, radius: num('radius'), thickness: num('thickness'), c1: num('c1'), c2: num('c2') };
    case 'gent':
      return { law, radius: num('radius'), thickness: num('thickness'), shearModulus: num('shear-modulus'), limit: num('limit') };
    case 'measured': {
      const points = v.points ? readPoints(ck, v.points as YNode, '`points`') : undefined;
      const deflation = v.deflation ? readPoints(ck, v.deflation as YNode, '`deflation`') : undefined;
      if (!points || (v.deflation && !deflation)) return undefined;
      return deflation ? { law, points, deflation } : { law, points };
    }
  }
  return undefined;
}

function checkThinWall(ck: Checker, map: YMap, wall: WallSpec): void {
  if (!('thickness' in wall)) return;
  const where = ck.get(map, 'thickness') ?? map;
  if (wall.thickness >= wall.radius) {
    ck.error(where, 'out-of-range', '`thickness` must be smaller than `radius` for a thin-walled sphere', 'check the units of radius and thickness');
  } else if (wall.thickness > THIN_WALL_RATIO * wall.radius) {
    ck.warn(where, 'thick-wall', `thickness/radius is ${(wall.thickness / wall.radius).toFixed(2)}; the thin-wall law is inaccurate above ${THIN_WALL_RATIO}`, 'expect the pressure–stretch curve to be approximate');
  }
}

function checkStretch(ck: Checker, where: Where, lambda: number, wall: WallSpec, what: string): void {
  if (wall.law !== 'gent') return;
  const lock = gentLockStretch(wall.limit);
  if (lambda >= lock) {
    ck.error(where, 'gent-lock', `${what} ${lambda.toPrecision(4)} is at or beyond the Gent lock stretch ${lock.toPrecision(4)} (limit Jm = ${wall.limit})`, `start below stretch ${lock.toPrecision(4)}, or raise \`limit\``);
  }
}

/**
 * A sphere starts at or above its unstretched size. Below it the wall law is only the slack
 * regime that lets an emptying chamber reach zero mass smoothly (physics/wall.ts), not a state
 * a rubber sphere is found in, so a start there is a slip (a stretch below 1, a volume in the
 * wrong unit, a gauge pressure with the wrong sign). A start by mass is checked in the model.
 */
function checkNotSlack(ck: Checker, where: Where, by: string, value: number, wall: WallSpec | undefined): boolean {
  const hint = 'start a sphere at stretch 1 or more (0 kPa gauge or above); it shrinks below its unstretched size only while it empties';
  if (by === 'stretch' && value < 1) {
    ck.error(where, 'start-range', `the start stretch ${value} is below 1: the sphere would start smaller than its unstretched size`, hint);
    return false;
  }
  const V0 = wall ? sphereVolume(wall) : undefined;
  if (by === 'volume' && V0 !== undefined && value < V0 * (1 - 1e-12)) {
    ck.error(where, 'start-range', `the start volume ${(value * 1e6).toPrecision(4)} mL is below the sphere's unstretched volume ${(V0 * 1e6).toPrecision(4)} mL`, hint);
    return false;
  }
  if (by === 'pressure' && value < ck.ambientPa) {
    ck.error(where, 'start-range', `the start pressure ${((value - ck.ambientPa) / 1000).toPrecision(4)} kPa gauge is below ambient: the sphere would start smaller than its unstretched size`, hint);
    return false;
  }
  return true;
}

function readStart(ck: Checker, node: YNode, law: string | undefined, wall: WallSpec | undefined, fieldPos: Record<string, SourcePos>): { start?: StartSpec; temperature?: number } {
  const map = ck.map(node, '`start`', 'write e.g. `start: { pressure: 0 kPa gauge }`');
  if (!map) return {};
  ck.checkKeys(map, START.params.map((p) => p.name), '`start`');
  for (const e of map.entries) fieldPos[`start.${e.key}`] = ck.sourcePos({ pos: e.keyPos, path: [...map.path, e.key] });
  const given = START_KEYS.filter((k) => ck.get(map, k) !== undefined);
  const v = ck.params(map, START.params);
  const temperature = v.temperature as number | undefined;
  if (given.length === 0) {
    if (START_KEYS.some((k) => ck.wasSuggested(map, k))) return { temperature }; // a misspelt key, already reported
    ck.error(ck.missingAt(map, 'pressure'), 'missing-key', '`start` needs one of pressure, stretch, volume, mass', 'write e.g. `start: { pressure: 0 kPa gauge }`');
    return { temperature };
  }
  if (given.length > 1) {
    ck.error(ck.keyWhere(map, given[1]), 'conflicting-keys', `\`start\` has ${listChoices(given).replace(' or ', ' and ')}; give exactly one`, 'keep one of pressure, stretch, volume, mass');
    return { temperature };
  }
  const by = given[0];
  const value = v[by] as number | undefined;
  const where = ck.get(map, by) ?? map;
  if (value === undefined) return { temperature };
  if (by === 'stretch' && law !== undefined && !isSphere(law)) {
    ck.error(where, 'not-applicable', `a \`${law}\` chamber has no stretch`, `start it with pressure, ${law === 'rigid' ? '' : 'volume, '}or mass`);
    return { temperature };
  }
  if (by === 'volume' && law === 'rigid') {
    ck.error(where, 'not-applicable', 'a rigid chamber’s volume is fixed by its wall', 'start it with pressure or mass');
    return { temperature };
  }
  if (law !== undefined && isSphere(law) && !checkNotSlack(ck, where, by, value, wall)) return { temperature };
  if (wall) {
    if (by === 'stretch') checkStretch(ck, where, value, wall, 'the start stretch');
    const V0 = sphereVolume(wall);
    if (by === 'volume' && V0 !== undefined) checkStretch(ck, where, Math.cbrt(value / V0), wall, 'the stretch at the start volume');
    if (by === 'pressure' && wall.law === 'linear' && wall.volume + wall.compliance * (value - ck.ambientPa) <= 0) {
      ck.error(where, 'out-of-range', 'at this start pressure the linear wall’s volume V0 + C·p_gauge would not be positive', 'raise the start pressure or check volume and compliance');
    }
    if (by === 'volume' && wall.law === 'measured') {
      const [first, last] = [wall.points[0][0], wall.points[wall.points.length - 1][0]];
      if (value < first || value > last) ck.warn(where, 'outside-table', 'the start volume lies outside the measured points', 'the curve will be extrapolated');
    }
  }
  return { start: { by, value } as StartSpec, temperature };
}

function readLimits(ck: Checker, node: YNode, law: string | undefined, fieldPos: Record<string, SourcePos>): ChamberSpec['limits'] {
  const map = ck.map(node, '`limits`', 'write e.g. `limits: { pressure: 50 kPa gauge, stretch: 2.5 }`');
  if (!map) return undefined;
  ck.checkKeys(map, LIMITS.params.map((p) => p.name), '`limits`');
  for (const e of map.entries) fieldPos[`limits.${e.key}`] = ck.sourcePos({ pos: e.keyPos, path: [...map.path, e.key] });
  const v = ck.params(map, LIMITS.params);
  const stretchNode = ck.get(map, 'stretch');
  if (stretchNode && law !== undefined && !isSphere(law)) {
    ck.error(stretchNode, 'not-applicable', `a \`${law}\` chamber has no stretch`, 'give a pressure limit only');
    return undefined;
  }
  const out: NonNullable<ChamberSpec['limits']> = {};
  if (v.pressure !== undefined) out.pressure = v.pressure as number;
  if (v.stretch !== undefined) out.stretch = v.stretch as number;
  return out;
}

/** Explains a key that belongs to another wall law. */
function foreignParam(law: string | undefined, key: string): string | undefined {
  const owners = WALL_LAWS.filter((w) => w.params.some((p) => p.name === key)).map((w) => w.kind);
  if (!owners.length || law === undefined) return undefined;
  const own = wallLaw(law)?.params.map((p) => p.name) ?? [];
  return `\`${key}\` belongs to ${listChoices(owners)} walls; a \`${law}\` wall takes ${own.join(', ')}`;
}

export function readChamber(ck: Checker, entry: NameEntry, cx: ChamberContext): ChamberSpec | undefined {
  const map = ck.map(entry.node, `chamber \`${entry.name}\``, 'write e.g. `cell_a: { wall: rigid, volume: 1 L, start: { pressure: 0 kPa gauge } }`');
  if (!map) return undefined;
  const fieldPos: Record<string, SourcePos> = {};
  const wallNode = ck.get(map, 'wall');
  let law: string | undefined;
  if (!wallNode) {
    ck.missing(map, 'wall', `chamber \`${entry.name}\` has no \`wall\``, `add \`wall:\` with one of ${listChoices(WALL_LAWS.map((w) => w.kind))}`);
  } else {
    fieldPos.wall = ck.sourcePos(wallNode);
    law = ck.enumValue(wallNode, WALL_LAWS.map((w) => w.kind), 'wall law', 'unknown-wall');
  }
  const lawKeys = law ? (wallLaw(law)?.params ?? []) : WALL_LAWS.flatMap((w) => w.params);
  ck.checkKeys(map, [...CHAMBER.params.map((p) => p.name), ...lawKeys.map((p) => p.name)], `chamber \`${entry.name}\``, (k) => foreignParam(law, k));
  const wall = law ? readWall(ck, map, law, fieldPos) : undefined;
  if (wall) checkThinWall(ck, map, wall);

  const startNode = ck.get(map, 'start');
  let start: StartSpec | undefined;
  let temperature = ck.get(map, 'temperature') ? ck.quantity(ck.get(map, 'temperature') as YNode, 'temperature', '`temperature`', { gt: 0 }) : undefined;
  if (ck.get(map, 'temperature')) fieldPos.temperature = ck.sourcePos(ck.get(map, 'temperature') as YNode);
  if (!startNode) {
    ck.missing(map, 'start', `chamber \`${entry.name}\` has no \`start\``, 'add e.g. `start: { pressure: 0 kPa gauge }`');
  } else {
    const s = readStart(ck, startNode, law, wall, fieldPos);
    start = s.start;
    if (s.temperature !== undefined) {
      if (temperature !== undefined) {
        ck.error(startNode, 'conflicting-keys', `chamber \`${entry.name}\` gives its temperature twice (in start and beside it)`, 'keep one');
      }
      temperature = s.temperature;
      fieldPos.temperature = fieldPos['start.temperature'];
    }
  }
  const limitsNode = ck.get(map, 'limits');
  const limits = limitsNode ? readLimits(ck, limitsNode, law, fieldPos) : undefined;

  const htNode = ck.get(map, 'heat-transfer');
  const heatTransfer = htNode ? ck.quantity(htNode, 'heat-conductance', '`heat-transfer`', { ge: 0 }) : undefined;
  if (htNode) fieldPos['heat-transfer'] = ck.sourcePos(htNode);
  if (cx.heat === 'exchange' && !htNode) {
    ck.missing(map, 'heat-transfer', `chamber \`${entry.name}\` has no \`heat-transfer\`, which heat: exchange needs`, 'add e.g. `heat-transfer: 2 W/K` (h·A), or choose another heat model');
  } else if (cx.heat !== 'exchange' && htNode) {
    ck.warn(ck.keyWhere(map, 'heat-transfer'), 'unused-key', `\`heat-transfer\` is ignored with heat: ${cx.heat}`, 'set `heat: exchange` at the top level to use it');
  }
  if (!wall || !start) return undefined;
  const spec: ChamberSpec = { name: entry.name, wall, start, pos: ck.sourcePos(entry.where), fieldPos };
  if (temperature !== undefined) spec.temperature = temperature;
  if (limits && Object.keys(limits).length) spec.limits = limits;
  if (heatTransfer !== undefined) spec.heatTransfer = heatTransfer;
  return spec;
}
