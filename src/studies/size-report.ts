/**
 * Outputs of sizing: the table for people and the JSON (contract in netlist.md: status,
 * parameters { PATH: value } in SI, binding, margins { name: number }).
 */
import type { SizeReport } from './size.js';

function g(x: number, digits = 4): string {
  if (!Number.isFinite(x)) return x > 0 ? '∞' : x < 0 ? '−∞' : '–';
  return String(Number(x.toPrecision(digits)));
}

function table(rows: string[][]): string[] {
  const w = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === 0 ? cell.padEnd(w[c]) : cell.padStart(w[c]))).join('  ').trimEnd());
}

export function sizeText(r: SizeReport, netlist: string): string {
  const out: string[] = [];
  const how = r.method === 'boundary' ? 'feasible boundary by bisection' : 'compass search with an extreme barrier';
  out.push(`size ${netlist}: ${r.status} (${how}, ${r.simulations} simulations)`);
  out.push(`  ${r.message}`);
  out.push('');
  const rows = [['parameter', r.status === 'found' ? 'value' : 'closest', 'range']];
  for (const p of r.parameters) rows.push([p.path, p.text, `${g(p.lo)} … ${g(p.hi)} (SI)`]);
  out.push(...table(rows).map((l) => `  ${l}`));
  out.push('');
  const mrows = [['expectation', 'margin', '']];
  for (const [name, m] of Object.entries(r.margins)) mrows.push([name, `${g(m * 100, 3)} %`, name === r.binding ? 'binding' : m < r.margin ? 'FAILS' : '']);
  out.push(`margins${r.robust ? ' (worst case over the tolerances)' : ''}, as a fraction of each limit${r.margin ? `; required ≥ ${g(r.margin * 100, 3)} %` : ''}:`);
  out.push(...table(mrows).map((l) => `  ${l}`));
  if (r.robust) {
    const rb = r.robust;
    out.push('', `robust: ${rb.tolerances.join(', ')}: ${rb.mode === 'corners' ? `${rb.cases} corners` : `${rb.cases} Monte Carlo draws`}, ${rb.passed} pass`);
    if (rb.probability) out.push(`  probability of passing ${g(rb.probability.p, 3)} (95 % Wilson interval ${g(rb.probability.low, 3)} … ${g(rb.probability.high, 3)})`);
  }
  if (r.notes.length) out.push('', ...r.notes.map((n) => `note: ${n}`));
  return out.join('\n') + '\n';
}

export function sizeJson(r: SizeReport): string {
  const fin = (x: number): number | null => (Number.isFinite(x) ? x : null);
  const out = {
    format: 1, kind: 'plenum-size', status: r.status, message: r.message, method: r.method,
    parameters: Object.fromEntries(r.parameters.map((p) => [p.path, fin(p.value)])),
    binding: r.binding,
    margins: Object.fromEntries(Object.entries(r.margins).map(([k, v]) => [k, fin(v)])),
    required_margin: r.margin,
    objective: r.objective,
    netlist_values: Object.fromEntries(r.parameters.map((p) => [p.path, p.text])),
    robust: r.robust,
    simulations: r.simulations,
    notes: r.notes,
  };
  return JSON.stringify(out, null, 2) + '\n';
}
