/**
 * Elements of the kinds read from their table alone (kinds.ts: ELEMENT_TABLES): keys checked
 * against the table, values read as the table says (units, bounds, defaults), and every `name`
 * parameter resolved to a chamber or a reservoir (or `ambient`).
 */
import type { Checker } from './checker.js';
import type { ElementTable } from './kinds.js';
import { resolve, type NameEntry, type Names } from './names.js';
import type { ElementSpec } from './types.js';
import type { YNode } from './yaml-types.js';

export function readElement(ck: Checker, entry: NameEntry, table: ElementTable, names: Names): ElementSpec | undefined {
  const what = `${table.kind} \`${entry.name}\``;
  const example = table.params.filter((p) => p.required).map((p) => `${p.name}: ...`).join(', ');
  const map = ck.map(entry.node, what, `write e.g. \`${entry.name}: { ${example} }\``);
  if (!map) return undefined;
  ck.checkKeys(map, table.params.map((p) => p.name), what);
  const values = ck.params(map, table.params);
  let ok = true;
  for (const p of table.params) {
    const v = values[p.name];
    if (p.required && v === undefined) ok = false;
    if (p.dimension === 'name' && typeof v === 'string') {
      ok = resolve(ck, names, ck.get(map, p.name) as YNode, v, ['chamber', 'reservoir'], `\`${p.name}\` of ${what}`) && ok;
    }
  }
  return ok ? { kind: table.kind, name: entry.name, values, pos: ck.sourcePos(entry.where) } : undefined;
}
