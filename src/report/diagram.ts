/**
 * The network as a picture: chambers, reservoirs, feeds and vents placed in columns by
 * breadth-first distance from where the gas comes from, lines and valves between them, each
 * path drawn as wide as the net mass it carried over the run with an arrow the way that mass
 * went. Deterministic: the same input gives the same layout and the same bytes.
 *
 * References: Sugiyama, Tagawa & Toda, "Methods for visual understanding of hierarchical system
 * structures", IEEE Trans. SMC 11(2) (1981) 109–125 (layers, barycentre ordering to reduce
 * crossings).
 */
import type { ReportInput } from '../transient/report-input.js';
import { cylinderSummary } from '../transient/results.js';
import { display } from '../units/display.js';
import { esc, num, sigText, tag, text, textWidth } from './svg.js';
import { chamberStyles, channel, netTransfers } from './report-data.js';
import { FONT, markerSvg } from './svg-chart.js';

const INK = '#1a1a1a';
const MUTED = '#5c5c5c';
const PIPE = '#3d3d3d';
const ROW_H = 128;
const TOP = 64;
const MARGIN = 28;
/** Barycentre sweeps over the layers, alternating down and up. */
const SWEEPS = 4;
/** Drawn size over layout size: the diagram's text then matches the charts' on a page. */
const DISPLAY_SCALE = 1.25;
/** Bold text runs wider than the regular estimate. */
const BOLD = 1.12;
const TITLE = 'Network: where the gas went';
const SUBTITLE = 'pipe width and arrow: net mass moved over the run and its way; dashed circle: a sphere\'s size at the start';

type NodeKind = 'chamber' | 'reservoir' | 'ambient' | 'feed' | 'cylinder';

interface DNode {
  id: string;
  name: string;
  kind: NodeKind;
  layer: number;
  order: number;
  x: number;
  y: number;
  /** Distance from the centre to the outline, for trimming edges. */
  r: number;
  lines: string[];
}

interface DEdge {
  id: string;
  label: string;
  a: string;
  b: string;
  /** The cylinder side an end attaches to, when that end is a cylinder. */
  aPort?: 'cap' | 'rod';
  bPort?: 'cap' | 'rod';
  /** Net mass a → b over the run, kg (negative: b → a). */
  net: number;
  valves: { name: string; operation: string }[];
  feed?: boolean;
}

export interface DiagramOptions { standalone?: boolean }

// ---- helpers --------------------------------------------------------------------------------

/** Drawn radius (px) of a spherical chamber at stretch λ: proportional, within readable bounds. */
/** `color` (#rrggbb) laid over white at `alpha`, as an opaque colour (pipes end beneath nodes). */
function tint(color: string, alpha: number): string {
  const c = [1, 3, 5].map((i) => parseInt(color.slice(i, i + 2), 16));
  return `#${c.map((v) => Math.round(255 - alpha * (255 - v)).toString(16).padStart(2, '0')).join('')}`;
}

/**
 * Chambers above which the network is not drawn: a diagram of that many nodes is neither
 * legible nor small (a few hundred kB per hundred chambers); the report's tables carry them.
 */
export const MAX_DIAGRAM_CHAMBERS = 300;

/** The diagram's place, saying why it is empty. */
function tooLargeToDraw(chambers: number, opts: DiagramOptions): string {
  const W = 640, H = 90;
  const root = tag('svg', {
    xmlns: 'http://www.w3.org/2000/svg', viewBox: `0 0 ${W} ${H}`, width: W * DISPLAY_SCALE, height: H * DISPLAY_SCALE, role: 'img',
    'aria-labelledby': 'network-title', class: 'plenum-diagram', id: 'network', 'font-family': FONT,
  },
  tag('title', { id: 'network-title' }, esc(TITLE)),
  opts.standalone ? tag('rect', { x: 0, y: 0, width: W, height: H, fill: '#ffffff' }) : '',
  text({ x: MARGIN, y: 22, 'font-size': 14.5, 'font-weight': 700, fill: INK }, TITLE),
  text({ x: MARGIN, y: 48, 'font-size': 12, fill: MUTED }, `${chambers} chambers: more than ${MAX_DIAGRAM_CHAMBERS}, too many to draw legibly.`),
  text({ x: MARGIN, y: 66, 'font-size': 12, fill: MUTED }, 'The tables list every chamber, line and valve.'));
  return opts.standalone ? `<?xml version="1.0" encoding="UTF-8"?>\n${root}\n` : root;
}

interface Box { x0: number; y0: number; x1: number; y1: number }

function overlap(a: Box, b: Box): number {
  const w = Math.min(a.x1, b.x1) - Math.max(a.x0, b.x0);
  const h = Math.min(a.y1, b.y1) - Math.max(a.y0, b.y0);
  return w > 0 && h > 0 ? w * h : 0;
}

/**
 * Boxes filed by the cells of a square grid they touch, so that the total overlap of a query box
 * with them looks only at its neighbourhood: label placement in a diagram of a thousand chambers
 * scored every candidate against every box (seconds); the sum is the same.
 */
class BoxGrid {
  private readonly cells = new Map<number, Box[]>();
  private readonly stamp = new Map<Box, number>();
  private query = 0;

  constructor(private readonly size = 160) {}

  private cellsOf(b: Box, each: (key: number) => void): void {
    const i0 = Math.floor(b.x0 / this.size), i1 = Math.floor(b.x1 / this.size);
    const j0 = Math.floor(b.y0 / this.size), j1 = Math.floor(b.y1 / this.size);
    for (let i = i0; i <= i1; i++) for (let j = j0; j <= j1; j++) each(i * 100003 + j);
  }

  add(b: Box): void {
    this.cellsOf(b, (key) => {
      const list = this.cells.get(key);
      if (list) list.push(b); else this.cells.set(key, [b]);
    });
  }

  /** Σ overlap(b, box) over the boxes filed, each counted once. */
  overlapWith(b: Box): number {
    const q = ++this.query;
    let sum = 0;
    this.cellsOf(b, (key) => {
      for (const other of this.cells.get(key) ?? []) {
        if (this.stamp.get(other) === q) continue;
        this.stamp.set(other, q);
        sum += overlap(b, other);
      }
    });
    return sum;
  }
}

/** Half-length of a cylinder symbol's body (px); its ports sit under the two ends. */
const CYL_HALF = 34;

/** Where a pipe meets a cylinder side: under the cap end or the rod end of the body. */
function portPoint(n: { x: number; y: number }, side: 'cap' | 'rod'): { x: number; y: number } {
  return { x: n.x + (side === 'cap' ? -CYL_HALF + 8 : CYL_HALF - 8), y: n.y + 13 };
}

/**
 * A cylinder symbol: the body with its end caps, the piston and rod at the final position
 * (solid) and at the start (dashed), and the two ports as small stubs under the ends.
 */
function cylinderSymbol(x: number, y: number, f0: number, f1: number, doubleActing: boolean, color: string): string[] {
  const L = CYL_HALF, H = 13;
  const px = (f: number): number => x - L + 5 + Math.max(0, Math.min(1, f)) * (2 * L - 14);
  const parts = [
    tag('rect', { x: x - L, y: y - H, width: 2 * L, height: 2 * H, rx: 2, fill: tint(color, 0.18), stroke: INK, 'stroke-width': 1.8 }),
    tag('path', { d: `M${num(px(f0))},${num(y - H + 2)}L${num(px(f0))},${num(y + H - 2)}M${num(px(f0))},${num(y)}L${num(x + L + 16)},${num(y)}`, fill: 'none', stroke: INK, 'stroke-width': 1, 'stroke-dasharray': '3 2.5' }),
    tag('rect', { x: px(f1) - 2.5, y: y - H + 1.5, width: 5, height: 2 * H - 3, fill: INK }),
    tag('rect', { x: px(f1), y: y - 2.5, width: x + L + 22 - px(f1), height: 5, fill: INK }),
  ];
  for (const side of doubleActing ? ['cap', 'rod'] as const : ['cap'] as const) {
    const p = portPoint({ x, y }, side);
    parts.push(tag('path', { d: `M${num(p.x - 3)},${num(p.y)}L${num(p.x - 3)},${num(p.y + 5)}M${num(p.x + 3)},${num(p.y)}L${num(p.x + 3)},${num(p.y + 5)}`, fill: 'none', stroke: INK, 'stroke-width': 1.4 }));
  }
  if (!doubleActing) {
    const p = portPoint({ x, y }, 'rod');
    parts.push(tag('path', { d: `M${num(p.x - 4)},${num(p.y - 13)}L${num(p.x + 4)},${num(p.y - 21)}`, fill: 'none', stroke: INK, 'stroke-width': 1.2 }));
  }
  return parts;
}

function sphereRadius(lambda: number): number {
  return Math.max(8, Math.min(34, 15 * (Number.isFinite(lambda) ? lambda : 1)));
}

function gaugeText(p: number): string {
  return display(p, 'gauge').replace(' kPa gauge', '');
}

// ---- the diagram ----------------------------------------------------------------------------

export function networkDiagram(input: ReportInput, opts: DiagramOptions = {}): string {
  const topo = input.topology;
  if (topo.chambers.length > MAX_DIAGRAM_CHAMBERS) return tooLargeToDraw(topo.chambers.length, opts);
  const r = input.result;
  const styles = chamberStyles(input);
  const nodes = new Map<string, DNode>();
  const edges: DEdge[] = [];
  const chamberSet = new Set(topo.chambers.map((c) => c.name));
  const reservoirDesc = new Map(topo.reservoirs.map((x) => [x.name, x.describe] as const));

  const addNode = (id: string, name: string, kind: NodeKind): DNode => {
    const n: DNode = { id, name, kind, layer: -1, order: 0, x: 0, y: 0, r: 24, lines: [] };
    nodes.set(id, n);
    return n;
  };
  for (const c of topo.chambers) addNode(c.name, c.name, 'chamber');
  for (const res of topo.reservoirs) if (!res.ambient) addNode(res.name, res.name, 'reservoir');
  const cylinders = topo.cylinders ?? [];
  for (const c of cylinders) addNode(c.name, c.name, 'cylinder');
  /** `clamp.cap` → the cylinder node `clamp` and its side. */
  const portOf = (name: string): { id: string; side?: 'cap' | 'rod' } => {
    const m = /^(.*)\.(cap|rod)$/.exec(name);
    return m && nodes.get(m[1])?.kind === 'cylinder' ? { id: m[1], side: m[2] as 'cap' | 'rod' } : { id: name };
  };

  const transfers = netTransfers(input);
  let vents = 0;
  const endpoint = (name: string): string => {
    if (name !== 'ambient') return portOf(name).id;
    vents++;
    const id = `ambient#${vents}`;
    addNode(id, 'ambient', 'ambient');
    return id;
  };
  const valveOp = new Map(topo.valves.map((v) => [v.name, v.operation] as const));
  for (const l of topo.lines) {
    edges.push({ id: l.name, label: l.name, a: endpoint(l.from), b: endpoint(l.to), aPort: portOf(l.from).side, bPort: portOf(l.to).side, net: transfers.get(l.name) ?? 0, valves: l.valves.map((v) => ({ name: v, operation: valveOp.get(v) ?? '' })) });
  }
  for (const v of topo.valves) {
    if (v.inLine) continue;
    edges.push({ id: v.name, label: '', a: endpoint(v.from), b: endpoint(v.to), aPort: portOf(v.from).side, bPort: portOf(v.to).side, net: transfers.get(v.name) ?? 0, valves: [{ name: v.name, operation: v.operation }] });
  }
  for (const f of topo.feeds) {
    addNode(`feed:${f.name}`, f.name, 'feed');
    edges.push({ id: `feed:${f.name}`, label: '', a: `feed:${f.name}`, b: portOf(f.into).id, bPort: portOf(f.into).side, net: 0, valves: [], feed: true });
  }

  // adjacency (vents excluded from the search: they hang off their chamber)
  const adj = new Map<string, string[]>();
  for (const n of nodes.keys()) adj.set(n, []);
  for (const e of edges) { adj.get(e.a)!.push(e.b); adj.get(e.b)!.push(e.a); }
  const startGauge = (name: string): number => channel(input, `${name}.gauge`)?.[0] ?? 0;

  // layers by breadth-first search from the reservoirs; feeds and vents hang off their chamber
  const roots = [...nodes.values()].filter((n) => n.kind === 'reservoir').map((n) => n.id);
  const bfs = (from: string[]): void => {
    const queue = [...from];
    for (const id of from) nodes.get(id)!.layer = 0;
    while (queue.length) {
      const id = queue.shift()!;
      const n = nodes.get(id)!;
      for (const m of adj.get(id)!) {
        const nm = nodes.get(m)!;
        if (nm.layer >= 0 || nm.kind === 'ambient' || nm.kind === 'feed') continue;
        nm.layer = n.layer + 1;
        queue.push(m);
      }
    }
  };
  bfs(roots);
  for (;;) {
    // a part with no boundary source: start from its highest-pressure chamber (or a cylinder)
    const rest = topo.chambers.filter((c) => nodes.get(c.name)!.layer < 0);
    if (!rest.length) {
      const cyl = cylinders.find((c) => nodes.get(c.name)!.layer < 0);
      if (!cyl) break;
      bfs([cyl.name]);
      continue;
    }
    const best = rest.reduce((a, b) => (startGauge(b.name) > startGauge(a.name) ? b : a));
    bfs([best.name]);
  }
  for (const n of nodes.values()) {
    if (n.kind !== 'ambient' && n.kind !== 'feed') continue;
    const nb = adj.get(n.id)!.map((m) => nodes.get(m)!).filter((m) => m.layer >= 0);
    n.layer = !nb.length ? 0 : n.kind === 'ambient' ? Math.max(...nb.map((m) => m.layer)) + 1 : Math.min(...nb.map((m) => m.layer)) - 1;
  }
  const shift = Math.min(0, ...[...nodes.values()].map((n) => n.layer));
  for (const n of nodes.values()) n.layer -= shift;

  // order within layers: discovery order, then barycentre sweeps
  const nLayers = Math.max(0, ...[...nodes.values()].map((n) => n.layer)) + 1;
  const layers: DNode[][] = Array.from({ length: nLayers }, () => []);
  for (const n of nodes.values()) layers[n.layer].push(n);
  layers.forEach((l) => l.forEach((n, i) => { n.order = i; }));
  for (let s = 0; s < SWEEPS; s++) {
    const down = s % 2 === 0;
    for (let li = down ? 1 : nLayers - 2; down ? li < nLayers : li >= 0; li += down ? 1 : -1) {
      const ref = li + (down ? -1 : 1);
      const bary = (n: DNode): number => {
        const nb = adj.get(n.id)!.map((m) => nodes.get(m)!).filter((m) => m.layer === ref);
        return nb.length ? nb.reduce((a, m) => a + m.order, 0) / nb.length : n.order;
      };
      const keyed = layers[li].map((n) => ({ n, k: bary(n) }));
      keyed.sort((a, b) => a.k - b.k || a.n.order - b.n.order);
      keyed.forEach((e, i) => { e.n.order = i; });
      layers[li] = keyed.map((e) => e.n);
    }
  }

  // node contents and sizes
  const fmtStretch = (v: number | undefined): string => (v === undefined || !Number.isFinite(v) ? '?' : sigText(v, 3));
  const startStretch = (name: string): number => channel(input, `${name}.stretch`)?.[0] ?? 1;
  const endStretch = (name: string): number => r.chambers[name]?.final.stretch ?? startStretch(name);
  for (const n of nodes.values()) {
    if (n.kind === 'chamber') {
      const c = topo.chambers.find((x) => x.name === n.name)!;
      const g0 = startGauge(n.name);
      const g1 = r.chambers[n.name]?.final.gauge ?? Number.NaN;
      n.lines.push(`${gaugeText(g0)} → ${gaugeText(g1)} kPa`);
      n.r = c.sphere ? Math.max(sphereRadius(startStretch(n.name)), sphereRadius(endStretch(n.name))) + 3 : c.rigid ? 30 : 28;
      if (c.sphere) {
        const l0 = channel(input, `${n.name}.stretch`)?.[0];
        n.lines.push(`λ ${fmtStretch(l0)} → ${fmtStretch(r.chambers[n.name]?.final.stretch)}`);
      } else if (!c.rigid) {
        const v0 = channel(input, `${n.name}.volume`)?.[0] ?? Number.NaN;
        n.lines.push(`${display(v0, 'volume')} → ${display(r.chambers[n.name]?.final.volume ?? Number.NaN, 'volume')}`);
      } else {
        n.lines.push(c.describe);
      }
      const m0 = channel(input, `${n.name}.mass`)?.[0] ?? Number.NaN;
      const m1 = r.chambers[n.name]?.final.mass ?? Number.NaN;
      if (m0 > 0) n.lines.push(`mass ${m1 >= m0 ? '+' : '−'}${sigText(Math.abs(100 * (m1 - m0) / m0), 2)} %`);
    } else if (n.kind === 'reservoir') {
      n.r = 32;
      n.lines.push(reservoirDesc.get(n.name) ?? '');
    } else if (n.kind === 'cylinder') {
      const c = cylinders.find((x) => x.name === n.name)!;
      const x0 = channel(input, `${n.name}.position`)?.[0] ?? 0;
      const cs = cylinderSummary(r, n.name);
      n.r = CYL_HALF + 10;
      n.lines.push(c.describe);
      n.lines.push(`x ${display(x0, 'position')} → ${display(cs?.final.position ?? Number.NaN, 'position')}`);
      if (cs) n.lines.push(`peak ${display(Math.abs(cs.peak.velocity), 'velocity')}${cs.impacts.length ? `, impact ${display(Math.max(...cs.impacts.map((i) => Math.abs(i.velocity))), 'velocity')}` : ''}`);
    } else if (n.kind === 'feed') {
      n.r = 16;
      n.lines.push(topo.feeds.find((f) => f.name === n.name)?.describe ?? '');
    } else {
      n.r = 13;
    }
  }
  const labelW = Math.max(120, ...[...nodes.values()].flatMap((n) => [textWidth(n.name, 12.5), ...n.lines.map((l) => textWidth(l, 11))]));
  const colW = Math.min(300, labelW + 90);
  const maxRows = Math.max(1, ...layers.map((l) => l.length));
  // a node with nothing to its right carries its label beside it, clear of the paths arriving
  const labelRight = (n: DNode): boolean => n.kind !== 'ambient' && !adj.get(n.id)!.some((m) => nodes.get(m)!.layer > n.layer);
  const labelWidth = (n: DNode): number => Math.max(BOLD * textWidth(n.name, 12.5), ...n.lines.map((l) => textWidth(l, 11)));
  const extraRight = Math.max(0, ...[...nodes.values()].filter(labelRight).map((n) => n.r + 10 + labelWidth(n) - colW / 2));
  const W = Math.max(2 * MARGIN + nLayers * colW + extraRight, 2 * MARGIN + textWidth(SUBTITLE, 11.5) + 10);
  const x0 = (W - extraRight - nLayers * colW) / 2;
  const placeLabel = (n: DNode): { x: number; y: number; anchor: string; box: Box } => {
    const w = labelWidth(n);
    const h = 14 + 13 * n.lines.length;
    if (labelRight(n)) {
      const x = n.x + n.r + 8;
      const y = n.y - h / 2 + 11;
      return { x, y, anchor: 'start', box: { x0: x - 2, y0: y - 12, x1: x + w + 2, y1: y - 12 + h + 2 } };
    }
    const y = n.kind === 'ambient' ? n.y + 28 : n.y + 44;
    return { x: n.x, y, anchor: 'middle', box: { x0: n.x - w / 2 - 2, y0: y - 12, x1: n.x + w / 2 + 2, y1: y - 12 + h + 2 } };
  };
  // rows: the fullest layer fills its rows in order; the others, outwards from it, sit level with
  // the mean of their placed neighbours (keeping order and a row apart), so paths run straight
  const row = new Map<string, number>();
  const fullest = layers.findIndex((l) => l.length === maxRows);
  layers[fullest].forEach((n, i) => row.set(n.id, i));
  const outward = [...layers.keys()].filter((li) => li !== fullest).sort((a, b) => Math.abs(a - fullest) - Math.abs(b - fullest) || a - b);
  for (const li of outward) {
    const l = layers[li];
    const want = l.map((n, i) => {
      const placed = adj.get(n.id)!.filter((m) => row.has(m)).map((m) => row.get(m)!);
      return placed.length ? placed.reduce((a, b) => a + b, 0) / placed.length : i + (maxRows - l.length) / 2;
    });
    const slots: number[] = [];
    for (let i = 0; i < l.length; i++) slots.push(Math.max(want[i], i === 0 ? 0 : slots[i - 1] + 1));
    for (let i = l.length - 1; i >= 0; i--) slots[i] = Math.min(slots[i], i === l.length - 1 ? maxRows - 1 : slots[i + 1] - 1);
    l.forEach((n, i) => row.set(n.id, slots[i]));
  }
  layers.forEach((l, li) => l.forEach((n) => {
    n.x = x0 + (li + 0.5) * colW;
    n.y = TOP + row.get(n.id)! * ROW_H + 38;
  }));

  // where node outlines and labels sit, so path labels can keep clear of them
  const nodeBoxes: Box[] = [...nodes.values()].flatMap((n) => [
    { x0: n.x - n.r - 2, y0: n.y - n.r - 2, x1: n.x + n.r + 2, y1: n.y + n.r + 2 },
    placeLabel(n).box,
  ]);
  const H = Math.ceil(Math.max(...nodeBoxes.map((b) => b.y1), TOP + 60) + 14);

  // edges: width by net mass carried, arrow the way it went
  const maxNet = Math.max(0, ...edges.map((e) => Math.abs(e.net)));
  const pairCount = new Map<string, number>();
  const geometry = edges.map((e) => {
    const A = nodes.get(e.a)!, B = nodes.get(e.b)!;
    const pair = [e.a, e.b].sort().join('|');
    const k = pairCount.get(pair) ?? 0;
    pairCount.set(pair, k + 1);
    const dx = B.x - A.x, dy = B.y - A.y;
    const len = Math.hypot(dx, dy) || 1;
    const ux = dx / len, uy = dy / len;
    const nx = -uy, ny = ux;
    // parallel paths, and paths within one column (past the labels under the nodes), bow out sideways
    const sameCol = A.layer === B.layer;
    const bow = (k === 0 ? 0 : (k % 2 ? 1 : -1) * Math.ceil(k / 2) * 30) + (sameCol ? (B.y > A.y ? -1 : 1) * Math.max(70, labelW / 2 + 12) : 0);
    const pa = e.aPort ? portPoint(A, e.aPort) : null;
    const pb = e.bPort ? portPoint(B, e.bPort) : null;
    const ax = pa ? pa.x : A.x + ux * A.r, ay = pa ? pa.y + 5 : A.y + uy * A.r;
    const bx = pb ? pb.x : B.x - ux * B.r, by = pb ? pb.y + 5 : B.y - uy * B.r;
    const cx = (ax + bx) / 2 + nx * bow * 2, cy = (ay + by) / 2 + ny * bow * 2;
    const frac = maxNet > 0 ? Math.abs(e.net) / maxNet : 0;
    const width = e.feed ? 2 : 2 + 7 * frac;
    const q = (t: number): { x: number; y: number } => ({
      x: (1 - t) * (1 - t) * ax + 2 * (1 - t) * t * cx + t * t * bx,
      y: (1 - t) * (1 - t) * ay + 2 * (1 - t) * t * cy + t * t * by,
    });
    return { e, ux, uy, nx, ny, ax, ay, bx, by, cx, cy, bow, frac, width, q };
  });
  // pipes keep labels off them too
  const pipeBoxes: Box[] = geometry.flatMap((g) => Array.from({ length: 19 }, (_, i) => {
    const p = g.q((i + 1) / 20);
    const h = g.width / 2 + 2;
    return { x0: p.x - h, y0: p.y - h, x1: p.x + h, y1: p.y + h };
  }));
  const occupied = new BoxGrid();
  for (const b of nodeBoxes) occupied.add(b);
  for (const b of pipeBoxes) occupied.add(b);
  const edgeSvg: string[] = [];
  const edgeLabels: string[] = [];
  for (const { e, ux, uy, nx, ny, ax, ay, bx, by, cx, cy, bow, frac, width, q } of geometry) {
    const d = bow ? `M${num(ax)},${num(ay)}Q${num(cx)},${num(cy)} ${num(bx)},${num(by)}` : `M${num(ax)},${num(ay)}L${num(bx)},${num(by)}`;
    const tip = e.label || e.valves.map((v) => v.name).join(', ');
    edgeSvg.push(tag('path', { class: 'pipe', 'data-name': tip || e.id, d, fill: 'none', stroke: PIPE, 'stroke-width': width, 'stroke-linecap': 'round', 'stroke-opacity': frac > 0.02 || e.feed ? 1 : 0.55 }));
    // direction of net transfer (or of the feed)
    const sgn = e.feed ? 1 : e.net > 0 ? 1 : e.net < 0 ? -1 : 0;
    if (sgn !== 0 && (e.feed || frac > 0.02)) {
      const t = sgn > 0 ? 0.78 : 0.22;
      const p = q(t), p2 = q(t + 0.01 * sgn);
      const ang = Math.atan2(p2.y - p.y, p2.x - p.x);
      const L = 10 + width, Wd = 5 + width * 0.8;
      const tx = p.x + Math.cos(ang) * L / 2, ty = p.y + Math.sin(ang) * L / 2;
      const bxx = p.x - Math.cos(ang) * L / 2, byy = p.y - Math.sin(ang) * L / 2;
      edgeSvg.push(tag('path', { class: 'flow-arrow', d: `M${num(tx)},${num(ty)}L${num(bxx - Math.sin(ang) * Wd)},${num(byy + Math.cos(ang) * Wd)} ${num(bxx + Math.sin(ang) * Wd)},${num(byy - Math.cos(ang) * Wd)}Z`, fill: PIPE }));
    }
    // valve symbols (two triangles tip to tip) along the path
    e.valves.forEach((v, i) => {
      const { x: px, y: py } = q(e.valves.length === 1 ? 0.5 : 0.35 + (0.3 * i) / (e.valves.length - 1));
      const L = 11, Wd = 8;
      const p1 = [px - ux * L - nx * Wd, py - uy * L - ny * Wd];
      const p2 = [px - ux * L + nx * Wd, py - uy * L + ny * Wd];
      const p3 = [px + ux * L - nx * Wd, py + uy * L - ny * Wd];
      const p4 = [px + ux * L + nx * Wd, py + uy * L + ny * Wd];
      // a symbol by how the valve opens: two triangles tip to tip (switched valve), a ball on
      // its seat (check valve: passes from → to only), a square with an offset arrow and a
      // spring (relief valve), after the usual fluid-power graphic conventions (common practice)
      const at = (a: number, b: number): string => `${num(px + ux * a + nx * b)},${num(py + uy * a + ny * b)}`;
      let shape: string;
      if (v.operation === 'check') {
        shape = tag('path', { d: `M${at(-L, -Wd)}L${at(L, -Wd)} ${at(L, Wd)} ${at(-L, Wd)}Z`, fill: '#ffffff', stroke: 'none' })
          + tag('circle', { cx: num(px + ux * 2), cy: num(py + uy * 2), r: 6.5, fill: '#ffffff', stroke: INK, 'stroke-width': 1.5 })
          + tag('path', { d: `M${at(-2, -Wd - 2)}L${at(8.5, 0)} ${at(-2, Wd + 2)}`, fill: 'none', stroke: INK, 'stroke-width': 1.5, 'stroke-linejoin': 'round' });
      } else if (v.operation === 'relief') {
        shape = tag('path', { d: `M${at(-L, -Wd)}L${at(L, -Wd)} ${at(L, Wd)} ${at(-L, Wd)}Z`, fill: '#ffffff', stroke: INK, 'stroke-width': 1.5, 'stroke-linejoin': 'round' })
          + tag('path', { d: `M${at(-7, 3)}L${at(7, 3)}M${at(7, 3)}L${at(3, 0.5)}M${at(7, 3)}L${at(3, 5.5)}`, fill: 'none', stroke: INK, 'stroke-width': 1.3 })
          + tag('path', { d: `M${at(-4, -Wd)}L${at(-2, -Wd - 4)} ${at(0, -Wd)} ${at(2, -Wd - 4)} ${at(4, -Wd)}`, fill: 'none', stroke: INK, 'stroke-width': 1.2 });
      } else {
        shape = tag('path', { d: `M${num(px)},${num(py)}L${num(p1[0])},${num(p1[1])} ${num(p2[0])},${num(p2[1])}ZM${num(px)},${num(py)}L${num(p3[0])},${num(p3[1])} ${num(p4[0])},${num(p4[1])}Z`, fill: '#ffffff', stroke: INK, 'stroke-width': 1.5, 'stroke-linejoin': 'round' });
      }
      edgeSvg.push(tag('g', { class: `valve valve-${v.operation || 'schedule'}`, 'data-name': v.name },
        tag('title', {}, esc(`valve ${v.name} (${v.operation})`)),
        shape,
      ));
    });
    // labels beside the path: of a few places along either side, the one that covers the
    // fewest node labels and earlier path labels
    const names = [e.label, ...e.valves.map((v) => (v.operation === 'schedule' ? v.name : `${v.name} (${v.operation})`))].filter(Boolean).join(' + ');
    const massText = e.feed ? '' : Math.abs(e.net) > 0 ? `net ${display(Math.abs(e.net), 'mass')}` : 'no net flow';
    const lines = [names, massText].filter(Boolean);
    if (!lines.length) continue;
    const lw = Math.max(...lines.map((t, i) => textWidth(t, i === 0 && names ? 11.5 : 11))) + 4;
    const lh = 14 * lines.length;
    const degA = adj.get(e.a)!.length, degB = adj.get(e.b)!.length;
    const base = degA >= 3 && degA > degB ? 0.62 : degB >= 3 && degB > degA ? 0.38 : 0.5;
    const across = Math.abs(ux) >= 0.5;
    let best: { score: number; box: Box; x: number; y: number; anchor: string } | undefined;
    for (const f of [base, 0.5, 0.35, 0.65, 0.25, 0.75]) {
      for (const side of [1, -1]) {
        const at = q(f);
        let sx = nx, sy = ny;
        if (across ? sy > 0 : sx < 0) { sx = -sx; sy = -sy; }
        sx *= side; sy *= side;
        const off = 9 + width / 2;
        const lx = at.x + sx * off, ly = at.y + sy * off;
        const anchor = Math.abs(sx) < 0.35 ? 'middle' : sx > 0 ? 'start' : 'end';
        const bx0 = anchor === 'middle' ? lx - lw / 2 : anchor === 'start' ? lx : lx - lw;
        const by0 = sy <= 0 && Math.abs(sy) >= 0.35 ? ly - lh : Math.abs(sy) < 0.35 ? ly - lh / 2 : ly;
        const box: Box = { x0: bx0, y0: by0, x1: bx0 + lw, y1: by0 + lh };
        const score = occupied.overlapWith(box) + (box.y0 < TOP - 14 ? 1e4 : 0);
        if (!best || score < best.score - 1e-9) best = { score, box, x: lx, y: box.y0, anchor };
      }
    }
    occupied.add(best!.box);
    const halo = { stroke: '#ffffff', 'stroke-width': 3.5, 'paint-order': 'stroke', 'text-anchor': best!.anchor };
    lines.forEach((t, i) => {
      edgeLabels.push(text({ x: best!.x, y: best!.y + 11 + 14 * i, 'font-size': i === 0 && names ? 11.5 : 11, 'font-weight': i === 0 && names ? 600 : undefined, fill: i === 0 && names ? INK : MUTED, ...halo }, t));
    });
  }

  // nodes
  const nodeSvg: string[] = [];
  for (const n of nodes.values()) {
    const g: string[] = [];
    if (n.kind === 'chamber') {
      const c = topo.chambers.find((x) => x.name === n.name)!;
      const st = styles.get(n.name)!;
      g.push(tag('title', {}, esc(`${n.name}: ${c.describe}`)));
      if (c.sphere) {
        g.push(tag('circle', { cx: n.x, cy: n.y, r: sphereRadius(endStretch(n.name)), fill: tint(st.color, 0.22), stroke: st.color, 'stroke-width': 2.2 }));
        g.push(tag('circle', { cx: n.x, cy: n.y, r: sphereRadius(startStretch(n.name)), fill: 'none', stroke: INK, 'stroke-width': 1, 'stroke-dasharray': '3 2.5' }));
      } else if (c.rigid) {
        g.push(tag('rect', { x: n.x - 30, y: n.y - 20, width: 60, height: 40, rx: 5, fill: tint(st.color, 0.22), stroke: st.color, 'stroke-width': 2.2 }));
      } else {
        g.push(tag('rect', { x: n.x - 30, y: n.y - 19, width: 60, height: 38, rx: 17, fill: tint(st.color, 0.22), stroke: st.color, 'stroke-width': 2.2 }));
      }
      // the series marker in the middle ties the node to its curves in the plots
      g.push(tag('g', { class: 'node-marker' }, markerSvg(st.marker, n.x, n.y, 5, st.color, true)));
    } else if (n.kind === 'reservoir') {
      g.push(tag('title', {}, esc(`reservoir ${n.name}: ${n.lines[0] ?? ''}`)));
      g.push(tag('rect', { x: n.x - 32, y: n.y - 21, width: 64, height: 42, rx: 3, fill: '#efefef', stroke: INK, 'stroke-width': 1.6 }));
      g.push(tag('rect', { x: n.x - 27, y: n.y - 16, width: 54, height: 32, rx: 2, fill: 'none', stroke: INK, 'stroke-width': 1 }));
    } else if (n.kind === 'cylinder') {
      const c = cylinders.find((x) => x.name === n.name)!;
      const x0 = channel(input, `${n.name}.position`)?.[0] ?? 0;
      const x1 = cylinderSummary(r, n.name)?.final.position ?? x0;
      g.push(tag('title', {}, esc(`cylinder ${n.name}: ${c.describe}; ports ${n.name}.cap${c.doubleActing ? ` and ${n.name}.rod` : ' (rod side open to ambient)'}`)));
      g.push(...cylinderSymbol(n.x, n.y, x0 / c.stroke, x1 / c.stroke, c.doubleActing, '#4c78a8'));
    } else if (n.kind === 'ambient') {
      g.push(tag('title', {}, esc('vent to ambient')));
      g.push(tag('path', { d: `M${num(n.x - 14)},${num(n.y - 10)}L${num(n.x + 14)},${num(n.y - 10)} ${num(n.x)},${num(n.y + 12)}Z`, fill: '#ffffff', stroke: INK, 'stroke-width': 1.6, 'stroke-linejoin': 'round' }));
    } else {
      g.push(tag('title', {}, esc(`feed ${n.name}: ${n.lines[0] ?? ''}`)));
      g.push(tag('circle', { cx: n.x, cy: n.y, r: 16, fill: '#ffffff', stroke: INK, 'stroke-width': 1.6 }));
      g.push(tag('path', { d: `M${num(n.x - 8)},${num(n.y)}L${num(n.x + 7)},${num(n.y)}M${num(n.x + 2)},${num(n.y - 5)}L${num(n.x + 8)},${num(n.y)} ${num(n.x + 2)},${num(n.y + 5)}`, fill: 'none', stroke: INK, 'stroke-width': 1.6 }));
    }
    const lab = placeLabel(n);
    g.push(text({ x: lab.x, y: lab.y, 'font-size': 12.5, 'font-weight': 700, fill: INK, 'text-anchor': lab.anchor, class: 'node-name' }, n.name));
    n.lines.forEach((l, i) => g.push(text({ x: lab.x, y: lab.y + 14 + 13 * i, 'font-size': 11, fill: MUTED, 'text-anchor': lab.anchor }, l)));
    nodeSvg.push(tag('g', { class: `node ${n.kind}`, 'data-name': n.name }, ...g));
  }

  const parts = [
    tag('title', { id: 'network-title' }, esc(TITLE)),
    opts.standalone ? tag('rect', { x: 0, y: 0, width: W, height: H, fill: '#ffffff' }) : '',
    text({ x: MARGIN, y: 22, 'font-size': 14.5, 'font-weight': 700, fill: INK }, TITLE),
    text({ x: MARGIN, y: 39, 'font-size': 11.5, fill: MUTED }, SUBTITLE),
    tag('g', { class: 'pipes' }, ...edgeSvg),
    tag('g', { class: 'nodes' }, ...nodeSvg),
    tag('g', { class: 'pipe-labels' }, ...edgeLabels),
  ];
  const root = tag('svg', {
    xmlns: 'http://www.w3.org/2000/svg', viewBox: `0 0 ${num(W)} ${num(H)}`, width: W * DISPLAY_SCALE, height: H * DISPLAY_SCALE, role: 'img',
    'aria-labelledby': 'network-title', class: 'plenum-diagram', id: 'network', 'font-family': FONT,
  }, ...parts);
  return opts.standalone ? `<?xml version="1.0" encoding="UTF-8"?>\n${root}\n` : root;
}
