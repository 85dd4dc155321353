/**
 * The tree a netlist's YAML is read into (yaml-tree.ts, fast-yaml.ts): maps, lists and scalars,
 * each with its source position and its path in the netlist.
 */
import type { Diagnostic } from '../diag/diagnostic.js';

export interface Pos {
  line: number;
  column: number;
}

interface Base {
  path: (string | number)[];
  /** Where the value starts. */
  pos: Pos;
  /** Where the key holding this value starts, if any (better for "missing" and "empty"). */
  keyPos?: Pos;
}
export interface YEntry {
  key: string;
  keyPos: Pos;
  value: YNode;
}
export interface YMap extends Base {
  kind: 'map';
  entries: YEntry[];
}
export interface YSeq extends Base {
  kind: 'seq';
  items: YNode[];
}
export interface YScalar extends Base {
  kind: 'scalar';
  value: unknown;
  /** True for `key:` with nothing after it. */
  empty: boolean;
}
export type YNode = YMap | YSeq | YScalar;

export interface YamlTree {
  root?: YNode;
  diagnostics: Diagnostic[];
}
