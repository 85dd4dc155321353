/**
 * Stiff integrators side by side on the benchmark networks, in process: RODAS (a jacobian and an
 * LU every step), the NDF/BDF multistep method (src/solve/bdf.ts: a jacobian kept across steps
 * and restarts) and ROS34PW2 (a W-method keeping its jacobian for up to `age` steps).
 * Same driver, samples and events as a run; reports work and CPU time of the solve (best of
 * `repeat`; CPU time moves less than wall time on a shared machine).
 *
 *   npx tsx bench/integrators.ts 1000,10000 [repeat] [chain|grid|star|file.yaml] [rodas,bdf,rosw]
 */
import { readFileSync } from 'node:fs';
import { bdf, type BdfOptions } from '../src/solve/bdf.js';
import { NetworkSystem } from '../src/assemble/system.js';
import { drive } from '../src/solve/driver.js';
import { rosenbrock } from '../src/solve/rosenbrock.js';
import { rosw, type RosWOptions } from '../src/solve/rosw.js';
import type { Integrator } from '../src/solve/types.js';
import { loadModel } from '../src/index.js';
import { netlistFor, type NetworkShape } from './networks.js';

export interface IntegratorRow { n: number; method: string; steps: number; rejected: number; rhs: number; jacobians: number; lu: number; /** CPU ms of the solve (this thread and the GC's). */
  ms: number; drift: number; yEnd: Float64Array }

export function compareIntegrators(n: number, repeat = 1, shape: NetworkShape | string = 'chain', methods = ['rodas', 'bdf']): IntegratorRow[] {
  const file = shape.endsWith('.yaml');
  const loaded = file ? loadModel(readFileSync(shape, 'utf8'), shape) : loadModel(netlistFor(shape as NetworkShape, n), `${shape}-${n}.yaml`);
  if (!loaded.ok) throw new Error(`${shape} does not load`);
  const model = loaded.value;
  const all: [string, string, Integrator][] = [
    ['rodas', 'rodas', rosenbrock],
    ['bdf', 'bdf', bdf],
    ['bdf1', 'bdf, local error at 1 × tolerance', (p, t0, y0, t1, cb, o) => bdf(p, t0, y0, t1, cb, { ...o, errorScale: 1 } as BdfOptions)],
    ['bdf3', 'bdf, local error at 1/3 of the tolerance', (p, t0, y0, t1, cb, o) => bdf(p, t0, y0, t1, cb, { ...o, errorScale: 3 } as BdfOptions)],
    ['rosw', 'ros34pw2, fresh J every step', (p, t0, y0, t1, cb, o) => rosw(p, t0, y0, t1, cb, { ...o, jacobianAge: 1 } as RosWOptions)],
    ['rosw', 'ros34pw2, J kept (error ≤ 0.1)', rosw],
    ['rosw', 'ros34pw2, J kept (error ≤ 0.5)', (p, t0, y0, t1, cb, o) => rosw(p, t0, y0, t1, cb, { ...o, keepError: 0.5 } as RosWOptions)],
  ];
  const variants = all.filter(([key]) => methods.includes(key)).map(([, name, f]) => [name, f] as [string, Integrator]);
  const best: (IntegratorRow | undefined)[] = variants.map(() => undefined);
  // round robin, so that warm-up and load shifts fall on every variant alike
  for (let k = 0; k < repeat; k++) {
    variants.forEach(([name, integrator], v) => {
      const sys = new NetworkSystem(model);
      const y0 = sys.initialState();
      sys.settleInitialModes(0, y0);
      const row = new Float64Array(sys.channels().length);
      const c0 = process.cpuUsage();
      const r = drive(sys, { integrator, t0: 0, tEnd: model.simulate.duration, y0, sample: model.simulate.sample ?? 0.01, observe: (tt, y) => sys.observe(tt, y, row), maxSteps: 1e6 });
      const c1 = process.cpuUsage(c0);
      const ms = (c1.user + c1.system) / 1000;
      const m0 = sys.totalMass(y0), m1 = sys.totalMass(r.y);
      const out = { n, method: name, ...r.work, ms, drift: (m1 - m0 - sys.boundaryInflow(r.y)) / m0, yEnd: r.y };
      if (!best[v] || ms < best[v]!.ms) best[v] = out;
    });
  }
  const rows = best as IntegratorRow[];
  return rows;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const n of (process.argv[2] ?? '1000').split(',').map(Number)) {
    const rows = compareIntegrators(n, Number(process.argv[3] ?? 1), process.argv[4] ?? 'chain', (process.argv[5] ?? 'rodas,bdf').split(','));
    const ref = rows[0].yEnd;
    for (const r of rows) {
      let dev = 0;
      for (let i = 0; i < ref.length; i++) dev = Math.max(dev, Math.abs(r.yEnd[i] - ref[i]) / (Math.abs(ref[i]) + 1e-12));
      console.log(`${n}\t${r.method}\tsteps ${r.steps}\trej ${r.rejected}\trhs ${r.rhs}\tjac ${r.jacobians}\tlu ${r.lu}\t${r.ms.toFixed(0)} ms\tdrift ${r.drift.toExponential(1)}\tmax rel dev from rodas ${dev.toExponential(1)}`);
    }
  }
}
