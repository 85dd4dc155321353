#!/usr/bin/env node
/**
 * Mutation check of the flow laws: perturbs each flow-law constant and sign in turn (1 % on a
 * coefficient, a swapped sign, a dropped term), runs the verification suite (test/verification)
 * against the mutated sources, and reports which mutants it kills (some test fails). Every
 * mutant must be killed: a flow law that can be 1 % wrong without a failing check is not
 * verified by magnitude. Exit 0 when all are killed, 1 otherwise; `--list` prints the mutants.
 *
 * Each mutant runs in a scratch copy of the repository (src, test, types, configs; node_modules
 * linked), so the working tree is never touched. The list and the last result are in
 * docs/verification.md.
 */
import { cpSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { spawnSync } from 'node:child_process';

const ROOT = resolve(new URL('..', import.meta.url).pathname);

/** [id, file, exact text, replacement, what it does]. Each text must occur exactly once. */
export const MUTANTS = [
  // orifice (isentropic nozzle)
  ['orifice-choked-1pc', 'src/physics/orifice.ts', 'return Cd * A * p0 * Math.sqrt(gamma / (R * T0)) * lastChoke;', 'return 1.01 * Cd * A * p0 * Math.sqrt(gamma / (R * T0)) * lastChoke;', 'choked orifice flow +1 %'],
  ['orifice-subsonic-sign', 'src/physics/orifice.ts', 'Math.pow(r, 2 / gamma) - Math.pow(r, (gamma + 1) / gamma)', 'Math.pow(r, 2 / gamma) + Math.pow(r, (gamma + 1) / gamma) - 2 * Math.pow(r, (gamma + 1) / gamma) * 1.01', 'subsonic orifice term 1 % off'],
  ['orifice-no-cd', 'src/physics/orifice.ts', 'return Cd * A * p0 * Math.sqrt(((2 * gamma)', 'return A * p0 * Math.sqrt(((2 * gamma)', 'discharge coefficient dropped (subsonic)'],
  ['orifice-critical-ratio', 'src/physics/orifice.ts', 'lastRc = Math.pow(2 / (gamma + 1), gamma / (gamma - 1));', 'lastRc = 1.01 * Math.pow(2 / (gamma + 1), gamma / (gamma - 1));', 'critical pressure ratio +1 %'],
  // ISO 6358
  ['iso-rho0-1pc', 'src/physics/gas.ts', 'export const ISO6358_RHO0 = 1.185;', 'export const ISO6358_RHO0 = 1.185 * 1.01;', 'ρ0 +1 %'],
  ['iso-no-temperature', 'src/physics/iso6358.ts', 'p1 * Math.sqrt(ISO6358_T0 / T1)', 'p1', 'temperature factor √(T0/T1) dropped'],
  ['iso-subsonic-index-ignored', 'src/physics/iso6358.ts', 'return choked * Math.pow(1 - z * z, m);', 'return choked * Math.pow(1 - z * z, 0.5);', 'subsonic index ignored'],
  ['iso-b-sign', 'src/physics/iso6358.ts', 'const z = (r - b) / (1 - b);', 'const z = (r - b) / (1 + b);', 'sign in (1 − b) swapped'],
  ['iso-gas-factor-dropped', 'src/physics/valve-flow.ts', 'return gas.isoFactor * iso6358MassFlow(', 'return iso6358MassFlow(', 'the gas conversion of a rating dropped'],
  ['iso-gas-factor-1pc', 'src/physics/gas.ts', 'return (Math.sqrt(gamma / R) * nozzlePsi(gamma)) / (Math.sqrt(air.gamma / Rair) * nozzlePsi(air.gamma));', 'return (1.01 * Math.sqrt(gamma / R) * nozzlePsi(gamma)) / (Math.sqrt(air.gamma / Rair) * nozzlePsi(air.gamma));', 'gas factor +1 %'],
  // gas
  ['gas-R-1pc', 'src/physics/gas.ts', 'const R = R_UNIVERSAL / spec.molarMass;', 'const R = 1.01 * R_UNIVERSAL / spec.molarMass;', 'specific gas constant +1 %'],
  ['gas-anr-pressure', 'src/physics/gas.ts', 'return ANR.pressure / (gas.R * ANR.temperature);', 'return 1.01 * ANR.pressure / (gas.R * ANR.temperature);', 'ANR density of other gases +1 %'],
  ['gas-viscosity-1pc', 'src/physics/gas.ts', 'return muRef * x * Math.sqrt(x) * ((Tref + S) / (T + S));', 'return 1.01 * muRef * x * Math.sqrt(x) * ((Tref + S) / (T + S));', 'viscosity +1 %'],
  // tube friction
  ['tube-laminar-64', 'src/physics/tube.ts', '  if (X <= 64 * RE_LAMINAR) {\n    Re = X / 64;', '  if (X <= 64 * RE_LAMINAR) {\n    Re = X / 64.64;', 'laminar friction constant 64 +1 %'],
  ['tube-haaland-6.9', 'src/physics/tube.ts', '  const A = a + 6.9 / Re;', '  const A = a + 6.969 / Re;', 'Haaland 6.9 +1 %'],
  ['tube-haaland-1.8', 'src/physics/tube.ts', 'const HAALAND_K = 1.8 / Math.LN10;', 'const HAALAND_K = 1.818 / Math.LN10;', 'Haaland 1.8 +1 %'],
  // lines that choke
  ['line-accel-dropped', 'src/physics/line-flow.ts', 'c2 * (f * s.LD + 2 * w * Math.log(p1 / pe))', 'c2 * (f * s.LD)', 'acceleration term dropped'],
  ['line-accel-1pc', 'src/physics/line-flow.ts', 'c2 * (f * s.LD + 2 * w * Math.log(p1 / pe))', 'c2 * (f * s.LD + 2.02 * w * Math.log(p1 / pe))', 'acceleration term +1 %'],
  ['line-entrance-dropped', 'src/physics/line-flow.ts', 'const p1 = (s.p0 * powMinusN(e)) / Math.sqrt(e);', 'const p1 = s.p0;', 'entrance pressure drop dropped'],
  ['line-entrance-temperature', 'src/physics/line-flow.ts', 'const T1 = s.T0 / e;', 'const T1 = s.T0;', 'entrance temperature drop dropped'],
  ['line-choke-1pc', 'src/physics/line-flow.ts', 'const pe = Math.max(s.pb, Math.sqrt(w) * ps);', 'const pe = Math.max(s.pb, 1.01 * Math.sqrt(w) * ps);', 'choking exit pressure +1 %'],
  ['line-friction-1pc', 'src/physics/line-flow.ts', 'const f = frictionFactor(Re, s.rel);', 'const f = 1.01 * frictionFactor(Re, s.rel);', 'friction in the compressible law +1 %'],
  ['line-laminar-choke-dropped', 'src/physics/line-flow.ts', '    if (pb < G * cs) {', '    if (pb < G * cs && false) {', 'choking of laminar lines dropped'],
  ['line-laminar-choke-1pc', 'src/physics/line-flow.ts', 'const k = (64 * mu * L * gas.R * T) / (D * D);', 'const k = (64.64 * mu * L * gas.R * T) / (D * D);', 'laminar choked law constant +1 %'],
  ['line-nozzle-bound-dropped', 'src/physics/line-flow.ts', '  if (m > nozzle) {', '  if (m > nozzle && false) {', 'nozzle bound dropped'],
  // valve operation
  ['check-cracking-sign', 'src/elements/branch.ts', 'const pEff = p1 - op.cracking;', 'const pEff = p1 + op.cracking;', 'cracking pressure sign swapped'],
  ['check-cracking-1pc', 'src/elements/branch.ts', 'const pEff = p1 - op.cracking;', 'const pEff = p1 - 1.01 * op.cracking;', 'cracking pressure +1 %'],
  ['relief-reverse', 'src/elements/branch.ts', "if (op.kind === 'relief' && out.mdot < 0) { out.mdot = 0; out.choked = false; }", '', 'relief one-way dropped'],
  ['relief-lift-1pc', 'src/elements/branch.ts', 'const x = (pFrom - this.pa - op.opensAbove) / (op.fullLiftAt - op.opensAbove);', 'const x = 1.01 * (pFrom - this.pa - op.opensAbove) / (op.fullLiftAt - op.opensAbove);', 'proportional lift +1 %'],
  ['relief-set-1pc', 'src/elements/branch.ts', 'const x = (pFrom - this.pa - op.opensAbove) / (op.fullLiftAt - op.opensAbove);', 'const x = (pFrom - this.pa - 1.01 * op.opensAbove) / (op.fullLiftAt - op.opensAbove);', 'proportional set pressure +1 %'],
  // feeds
  ['feed-anr-air', 'src/physics/gas.ts', "if (gas.name === 'air') return ISO6358_RHO0;", "if (gas.name === 'air') return 1.01 * ISO6358_RHO0;", 'ANR density of air +1 %'],
];

function run(dir) {
  const r = spawnSync(process.execPath, [join(ROOT, 'node_modules/vitest/vitest.mjs'), 'run', 'test/verification', '--config', 'mutants.vitest.config.mjs', '--reporter=dot'],
    { cwd: dir, encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { ok: r.status === 0, out: (r.stdout ?? '') + (r.stderr ?? '') };
}

function scratch() {
  const dir = mkdtempSync(join(tmpdir(), 'plenum-mutant-'));
  for (const d of ['src', 'test', 'types', 'networks']) cpSync(join(ROOT, d), join(dir, d), { recursive: true });
  for (const f of ['package.json', 'tsconfig.json']) cpSync(join(ROOT, f), join(dir, f));
  symlinkSync(join(ROOT, 'node_modules'), join(dir, 'node_modules'), 'dir');
  // no global setup (the CLI bundle is not needed by the verification suite); one process
  writeFileSync(join(dir, 'mutants.vitest.config.mjs'),
    "export default { test: { include: ['test/**/*.test.ts'], testTimeout: 120000, pool: 'forks', isolate: false, fileParallelism: false } };\n");
  return dir;
}

function main() {
  const args = process.argv.slice(2);
  const only = args.filter((a) => !a.startsWith('--'));
  const list = MUTANTS.filter((m) => only.length === 0 || only.includes(m[0]));
  if (args.includes('--list')) {
    for (const [id, file, , , what] of list) console.log(`${id}\t${file}\t${what}`);
    return 0;
  }
  const dir = scratch();
  try {
    const base = run(dir);
    if (!base.ok) {
      console.error('the verification suite fails without any mutant; fix that first:\n' + base.out.slice(-3000));
      return 2;
    }
    let survivors = 0;
    for (const [id, file, find, replace, what] of list) {
      const path = join(dir, file);
      const original = readFileSync(path, 'utf8');
      const n = original.split(find).length - 1;
      if (n !== 1) {
        console.log(`${id.padEnd(28)} INVALID  (${what}: the text occurs ${n} times in ${file})`);
        survivors++;
        continue;
      }
      writeFileSync(path, original.replace(find, replace));
      const r = run(dir);
      writeFileSync(path, original);
      if (!r.ok) console.log(`${id.padEnd(28)} killed   ${what}`);
      else { console.log(`${id.padEnd(28)} SURVIVED ${what}`); survivors++; }
    }
    console.log(`${list.length - survivors} of ${list.length} mutants killed`);
    return survivors === 0 ? 0 : 1;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

process.exit(main());
