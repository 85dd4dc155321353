/** `plenum kinds`: element kinds and wall laws with their parameters, from the parameter tables. */
import {
  CHAMBER, CONTROLLER, CYLINDER, CYLINDER_START, DEAD_VOLUME, ELEMENT_TABLES, FEED, FRICTION, LINE, MOUNTING, PORT_START, RESERVOIR, SPRING, VALVE,
  VALVE_OPERATIONS, VALVE_RATINGS, WALL_LAWS, type KindTable, type ParamSpec,
} from '../netlist/kinds.js';

const GROUPS: { title: string; tables: KindTable[]; label: (t: KindTable) => string }[] = [
  { title: 'chambers', tables: [CHAMBER], label: () => 'chamber' },
  { title: 'walls (chamber `wall:`)', tables: WALL_LAWS, label: (t) => `wall: ${t.kind}` },
  { title: 'reservoirs', tables: [RESERVOIR], label: () => 'reservoir' },
  { title: 'lines', tables: [LINE], label: () => 'line' },
  { title: 'valves', tables: [VALVE, ...VALVE_RATINGS, ...VALVE_OPERATIONS], label: (t) => (t.kind === 'valve' ? 'valve' : `valve ${t.section === 'valve-rating' ? 'rating' : 'opening'}: ${t.kind}`) },
  { title: 'feeds', tables: [FEED], label: () => 'feed' },
  {
    title: 'cylinders',
    tables: [CYLINDER, DEAD_VOLUME, SPRING, FRICTION, MOUNTING, CYLINDER_START, PORT_START],
    label: (t) => (t.kind === 'cylinder' ? 'cylinder' : t.kind === 'port-start' ? 'cylinder start: cap / rod' : `cylinder ${t.kind.replace('cylinder-', '')}`),
  },
  { title: 'controllers', tables: [CONTROLLER], label: () => 'controller' },
  ...ELEMENT_TABLES.map((k) => ({ title: k.key, tables: [k], label: () => k.kind })),
];

function dim(p: ParamSpec): string {
  switch (p.dimension) {
    case 'absolute-pressure': return 'pressure (gauge or abs)';
    case 'gauge-pressure': return 'pressure (gauge or abs)';
    case 'enum': return (p.values ?? []).join(' | ');
    case 'structure':
      if (p.shape === 'gain') return 'gain (with units)';
      if (p.shape === 'target') return 'value, table or expression';
      if (p.shape === 'boolean') return 'true | false';
      if (p.shape === 'opening') return 'opening';
      return p.shape === 'points' || p.shape === 'schedule' || p.shape === 'feed-curve' ? 'list' : 'map';
    default: return p.dimension;
  }
}

function need(p: ParamSpec): string {
  return p.required ? 'required' : p.default !== undefined ? `default ${p.default}` : 'optional';
}

export function kindsText(markdown: boolean): string {
  const out: string[] = [];
  if (markdown) {
    out.push('| kind | parameter | dimension | need | meaning |', '|---|---|---|---|---|');
    const esc = (x: string): string => x.replace(/\|/g, '\\|');
    for (const g of GROUPS) {
      for (const t of g.tables) {
        out.push(`| **${esc(g.label(t))}** | | | | ${esc(t.doc)} |`);
        for (const p of t.params) out.push(`| | \`${p.name}\` | ${esc(dim(p))} | ${need(p)} | ${esc(p.doc)} |`);
      }
    }
    return out.join('\n') + '\n';
  }
  for (const g of GROUPS) {
    out.push(g.title.toUpperCase());
    for (const t of g.tables) {
      out.push(`  ${g.label(t)}: ${t.doc}`);
      const w = Math.max(...t.params.map((p) => p.name.length));
      for (const p of t.params) out.push(`    ${p.name.padEnd(w)}  ${dim(p)}, ${need(p)}: ${p.doc}`);
    }
    out.push('');
  }
  return out.join('\n');
}
