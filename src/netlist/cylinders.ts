/**
 * Cylinders: geometry, moving mass, spring, external load, friction, mounting and start.
 *
 * Rules beyond the parameter tables: the rod is thinner than the bore; a single-acting
 * cylinder (no `rod`) has no rod-side gas, so neither a rod dead volume nor a rod start; the
 * start position lies within the stroke; static friction is not below sliding friction
 * (Karnopp's model needs F_s ≥ F_c; a missing one of the two takes the other's value); an
 * angle says its unit (a bare number would be read as radians, a likely slip for degrees).
 *
 * fieldPos keys: `bore`, `rod`, `stroke`, `dead-volume`, `moving-mass`, `start.position`,
 * `start.cap`, `start.rod`, `friction.static`.
 */
import type { Checker } from './checker.js';
import { CYLINDER, CYLINDER_START, DEAD_VOLUME, FRICTION, MOUNTING, PORT_START, SPRING } from './kinds.js';
import type { NameEntry } from './names.js';
import { readForceSeries } from './time-series.js';
import type { CylinderSpec, PortStartSpec, SourcePos } from './types.js';
import type { YMap, YNode } from './yaml-types.js';

const EXAMPLE = 'write e.g. `clamp: { bore: 32 mm, rod: 12 mm, stroke: 100 mm, dead-volume: 2 mL, moving-mass: 1.5 kg }`';

function mm(x: number): string {
  return `${Number((x * 1000).toPrecision(6))} mm`;
}

function readDeadVolume(ck: Checker, node: YNode, doubleActing: boolean): { cap: number; rod: number } | undefined {
  if (node.kind !== 'map') {
    const V = ck.quantity(node, 'volume', '`dead-volume`', { gt: 0 });
    return V === undefined ? undefined : { cap: V, rod: doubleActing ? V : 0 };
  }
  ck.checkKeys(node, DEAD_VOLUME.params.map((p) => p.name), '`dead-volume`');
  const v = ck.params(node, DEAD_VOLUME.params);
  const rodNode = ck.get(node, 'rod');
  if (!doubleActing && rodNode) {
    ck.error(ck.keyWhere(node, 'rod'), 'not-applicable', 'a single-acting cylinder has no rod-side gas, so no rod dead volume', 'remove `rod` here, or give the cylinder a `rod` diameter to make it double-acting');
    return undefined;
  }
  if (doubleActing && !rodNode) {
    ck.missing(node, 'rod', '`dead-volume` of a double-acting cylinder needs `rod` beside `cap`', 'add `rod: 2 mL`, or give one value for both sides');
    return undefined;
  }
  if (v.cap === undefined || (doubleActing && v.rod === undefined)) return undefined;
  return { cap: v.cap as number, rod: doubleActing ? (v.rod as number) : 0 };
}

function readPortStart(ck: Checker, node: YNode, side: string, fieldPos: Record<string, SourcePos>): PortStartSpec | undefined {
  const map = ck.map(node, `\`start.${side}\``, `write e.g. \`${side}: { pressure: 0 kPa gauge }\``);
  if (!map) return undefined;
  fieldPos[`start.${side}`] = ck.sourcePos(map);
  ck.checkKeys(map, PORT_START.params.map((p) => p.name), `\`start.${side}\``);
  const v = ck.params(map, PORT_START.params);
  const hasP = ck.get(map, 'pressure') !== undefined;
  const hasM = ck.get(map, 'mass') !== undefined;
  if (hasP && hasM) {
    ck.error(ck.keyWhere(map, 'mass'), 'conflicting-keys', `\`start.${side}\` has pressure and mass; give one`, 'keep one of pressure and mass');
    return undefined;
  }
  if (!hasP && !hasM) {
    if (ck.wasSuggested(map, 'pressure') || ck.wasSuggested(map, 'mass')) return undefined;
    ck.error(ck.missingAt(map, 'pressure'), 'missing-key', `\`start.${side}\` needs pressure or mass`, `write e.g. \`${side}: { pressure: 0 kPa gauge }\``);
    return undefined;
  }
  const value = (hasP ? v.pressure : v.mass) as number | undefined;
  if (value === undefined) return undefined;
  const out: PortStartSpec = { by: hasP ? 'pressure' : 'mass', value };
  if (v.temperature !== undefined) out.temperature = v.temperature as number;
  return out;
}

function readStart(ck: Checker, node: YNode | undefined, c: { stroke?: number; doubleActing: boolean; pa: number }, fieldPos: Record<string, SourcePos>): CylinderSpec['start'] | undefined {
  const atAmbient: PortStartSpec = { by: 'pressure', value: c.pa };
  if (!node) return { position: 0, cap: atAmbient, ...(c.doubleActing ? { rod: atAmbient } : {}) };
  const map = ck.map(node, '`start`', 'write e.g. `start: { position: 0 mm, cap: { pressure: 0 kPa gauge } }`', true);
  if (!map) return undefined;
  ck.checkKeys(map, CYLINDER_START.params.map((p) => p.name), 'a cylinder’s `start`');
  const v = ck.params(map, CYLINDER_START.params);
  const posNode = ck.get(map, 'position');
  if (posNode) fieldPos['start.position'] = ck.sourcePos(posNode);
  const x = v.position as number | undefined;
  let ok = x !== undefined;
  if (x !== undefined && c.stroke !== undefined && (x < 0 || x > c.stroke)) {
    ck.error(posNode ?? map, 'out-of-range', `the start position ${mm(x)} lies outside the stroke 0 … ${mm(c.stroke)}`, 'start the piston within its stroke: 0 (retracted) up to the stroke (extended)');
    ok = false;
  }
  const capNode = ck.get(map, 'cap');
  const rodNode = ck.get(map, 'rod');
  const cap = capNode ? readPortStart(ck, capNode, 'cap', fieldPos) : atAmbient;
  let rod: PortStartSpec | undefined = c.doubleActing ? atAmbient : undefined;
  if (rodNode && !c.doubleActing) {
    ck.error(ck.keyWhere(map, 'rod'), 'not-applicable', 'a single-acting cylinder has no rod-side gas to start', 'remove `start.rod`, or give the cylinder a `rod` diameter to make it double-acting');
    ok = false;
  } else if (rodNode) {
    rod = readPortStart(ck, rodNode, 'rod', fieldPos);
    ok = ok && rod !== undefined;
  }
  if (!ok || !cap) return undefined;
  return { position: x as number, cap, ...(rod ? { rod } : {}) };
}

function readFriction(ck: Checker, node: YNode, fieldPos: Record<string, SourcePos>): CylinderSpec['friction'] | undefined {
  const map = ck.map(node, '`friction`', 'write e.g. `friction: { static: 30 N, sliding: 20 N, viscous: 50 N*s/m }`', true);
  if (!map) return undefined;
  ck.checkKeys(map, FRICTION.params.map((p) => p.name), '`friction`');
  const v = ck.params(map, FRICTION.params);
  const given = (k: string): boolean => ck.get(map, k) !== undefined;
  if ((given('static') && v.static === undefined) || (given('sliding') && v.sliding === undefined) || v.viscous === undefined) return undefined;
  const Fs = (v.static ?? v.sliding ?? 0) as number;
  const Fc = (v.sliding ?? v.static ?? 0) as number;
  const sNode = ck.get(map, 'static');
  if (sNode) fieldPos['friction.static'] = ck.sourcePos(sNode);
  if (Fs < Fc) {
    ck.error(sNode ?? map, 'out-of-range', `static friction (${Fs} N) is below sliding friction (${Fc} N)`, 'the breakaway force of a seal is at least its sliding force: raise `static` or lower `sliding`');
    return undefined;
  }
  return { static: Fs, sliding: Fc, viscous: v.viscous as number };
}

function readAngle(ck: Checker, node: YNode): number | undefined {
  const map = ck.map(node, '`mounting`', 'write e.g. `mounting: { angle: 90 deg }`');
  if (!map) return undefined;
  ck.checkKeys(map, MOUNTING.params.map((p) => p.name), '`mounting`');
  const a = ck.get(map, 'angle');
  if (a?.kind === 'scalar' && (typeof a.value === 'number' || /^\s*[-+]?[\d.]+(?:e[-+]?\d+)?\s*$/i.test(String(a.value)))) {
    ck.error(a, 'unit-missing', `the angle \`${String(a.value)}\` has no unit`, 'write `90 deg` or `1.571 rad`');
    return undefined;
  }
  const v = ck.params(map, MOUNTING.params);
  return v.angle as number | undefined;
}

function readSpring(ck: Checker, node: YNode): CylinderSpec['spring'] | undefined {
  const map = ck.map(node, '`spring`', 'write e.g. `spring: { rate: 500 N/m, preload: 20 N }`');
  if (!map) return undefined;
  ck.checkKeys(map, SPRING.params.map((p) => p.name), '`spring`');
  const v = ck.params(map, SPRING.params);
  if (v.rate === undefined || v.preload === undefined) return undefined;
  return { rate: v.rate as number, preload: v.preload as number };
}

export function readCylinder(ck: Checker, entry: NameEntry, heat: 'isothermal' | 'adiabatic' | 'exchange'): CylinderSpec | undefined {
  const what = `cylinder \`${entry.name}\``;
  const map: YMap | undefined = ck.map(entry.node, what, EXAMPLE);
  if (!map) return undefined;
  ck.checkKeys(map, CYLINDER.params.map((p) => p.name), what);
  const v = ck.params(map, CYLINDER.params);
  const fieldPos: Record<string, SourcePos> = {};
  for (const k of ['bore', 'rod', 'stroke', 'dead-volume', 'moving-mass']) {
    const n = ck.get(map, k);
    if (n) fieldPos[k] = ck.sourcePos(n);
  }
  const bore = v.bore as number | undefined;
  const rod = v.rod as number | undefined;
  const stroke = v.stroke as number | undefined;
  const doubleActing = ck.get(map, 'rod') !== undefined;
  let ok = bore !== undefined && stroke !== undefined && v['moving-mass'] !== undefined && (!doubleActing || rod !== undefined);
  if (bore !== undefined && rod !== undefined && rod >= bore) {
    ck.error(ck.get(map, 'rod') as YNode, 'out-of-range', `the rod (${mm(rod)}) is not thinner than the bore (${mm(bore)})`, 'the rod diameter must be smaller than the bore; check both values and their units');
    ok = false;
  }
  const deadVolume = v['dead-volume'] ? readDeadVolume(ck, v['dead-volume'] as YNode, doubleActing) : undefined;
  const spring = v.spring ? readSpring(ck, v.spring as YNode) : { rate: 0, preload: 0 };
  const force = v.force ? readForceSeries(ck, v.force as YNode, '`force`') : undefined;
  const friction = v.friction ? readFriction(ck, v.friction as YNode, fieldPos) : { static: 0, sliding: 0, viscous: 0 };
  const angle = v.mounting ? readAngle(ck, v.mounting as YNode) : 0;
  const start = readStart(ck, v.start as YNode | undefined, { stroke, doubleActing, pa: ck.ambientPa }, fieldPos);
  if (ck.get(map, 'heat-transfer') && heat !== 'exchange') {
    ck.warn(ck.keyWhere(map, 'heat-transfer'), 'unused-key', `\`heat-transfer\` is ignored with heat: ${heat}`, 'set `heat: exchange` at the top level to use it');
  }
  if (!ok || !deadVolume || !spring || (v.force && !force) || !friction || angle === undefined || !start) return undefined;
  const spec: CylinderSpec = {
    name: entry.name,
    bore: bore as number,
    stroke: stroke as number,
    deadVolume,
    movingMass: v['moving-mass'] as number,
    spring,
    friction,
    angle,
    start,
    pos: ck.sourcePos(entry.where),
    fieldPos,
  };
  if (rod !== undefined) spec.rod = rod;
  if (force) spec.force = force;
  if (v['heat-transfer'] !== undefined) spec.heatTransfer = v['heat-transfer'] as number;
  return spec;
}
