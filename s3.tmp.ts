import { readNetlist } from './src/netlist/read';
import { formatDiagnostic } from './src/diag/diagnostic';
const base = (chamber: string, extra = '') => `format: 1
chambers:
  cell:
${chamber}
lines:
  vent: { from: cell, to: ambient, diameter: 1 mm, length: 1 m }
simulate: { duration: 1 s }
${extra}`;
const rigid = `    wall: rigid
    volume: 1 L
    start: { pressure: 100 kPa gauge }`;
const cases: Record<string, string> = {
  syntax: 'format: 1\nchambers: [1, 2\nsimulate: {duration: 1 s}\n',
  dup: base(rigid + '\n    volume: 2 L'),
  unknownKey: base(rigid).replace('diameter: 1 mm', 'diamter: 1 mm'),
  wall: base(rigid.replace('rigid', 'rigd')),
  dim: base(rigid.replace('1 L', '1 kPa')),
  gauge: base(rigid.replace('100 kPa gauge', '100 kPa')),
  alias: 'format: 1\na: &a [1,2]\nb: *a\n',
  empty: '',
  comments: '# nothing\n',
  binary: 'format: 1\n\u0000\u0001junk',
  deep: 'format: 1\nx: ' + '['.repeat(100) + ']'.repeat(100) + '\n',
  deepBlock: 'format: 1\n' + Array.from({length: 40}, (_, i) => ' '.repeat(2*i) + 'a:').join('\n') + ' 1\n',
  nonfinite: base(rigid.replace('1 L', '.inf')),
  noformat: base(rigid).replace('format: 1\n', ''),
  tag: base(rigid.replace('1 L', '!python/object 1 L')),
  gas: base(rigid, 'gas: helim\n'),
  topkey: base(rigid, 'chamber: {}\n'),
  list: '- a\n- b\n',
  multi: 'format: 1\n---\nformat: 1\n',
  exprImport: base(rigid, 'reservoirs:\n  r: { pressure: "import(\\"fs\\") gauge" }\n'),
  exprDim: base(rigid, 'reservoirs:\n  r: { pressure: "100 kPa * t gauge" }\n'),
  exprNeg: base(rigid, 'reservoirs:\n  r: { pressure: "100 kPa - 100 kPa * t/(1 s) gauge" }\n'),
  probe: base(rigid, 'expect:\n  - { probe: cel.pressure, at: end, below: 1 bar abs }\n  - { probe: vent.pressure, at: end, below: 1 bar abs }\n  - { probe: cell.stretch, at: end, below: 2 }\n  - { probe: cell.gauge, at: 5 s, below: 2 }\n'),
  anr: base(rigid, 'feeds:\n  f: { into: cell, rate: 10 L/min }\n'),
};
for (const [k, src] of Object.entries(cases)) {
  const r = readNetlist(src, 'n.yaml');
  console.log(`--- ${k}: ok=${r.ok}`);
  console.log((r.ok ? r.warnings : r.diagnostics).map(formatDiagnostic).join('\n'));
}
