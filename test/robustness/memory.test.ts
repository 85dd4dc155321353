/**
 * Memory is bounded before it runs out (docs/robustness.md, "Limits"): a run whose sampled
 * history cannot fit is refused at once (exit 2, `too-much-memory`, with the sample interval
 * that fits), and `plenum check` survives a worker thread that runs out of memory: that netlist
 * becomes an error case in the tally and the JUnit report, the others are checked.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { NetworkSystem } from '../../src/assemble/system.js';
import { runAll } from '../../src/cli/check.js';
import { junitXml, type NetlistCheck } from '../../src/index.js';
import { traceMemory, traceMemoryDiagnostic } from '../../src/transient/trace-memory.js';
import { buildModel } from '../../src/model/build.js';
import { readNetlist } from '../../src/netlist/read.js';
import type { Model } from '../../src/model/types.js';

/** The model of a netlist, built without loadModel's memory check (which would refuse it). */
function modelFromText(text: string): Model {
  const doc = readNetlist(text, 'chain.yaml');
  if (!doc.ok) throw new Error(doc.diagnostics[0].message);
  const m = buildModel(doc.value);
  if (!m.ok) throw new Error(m.diagnostics[0].message);
  return m.value;
}

const ROOT = process.cwd();

/** 120 rigid chambers in a chain, sampled every `sample` for 1 s: a valid netlist of a few kB. */
function chain(sample: string): string {
  const out = ['format: 1', 'title: rigid chain', 'chambers:'];
  for (let i = 0; i < 120; i++) out.push(`  c${i}: { wall: rigid, volume: 10 mL, start: { pressure: ${i === 0 ? 100 : 0} kPa gauge } }`);
  out.push('lines:');
  for (let i = 0; i + 1 < 120; i++) out.push(`  l${i}: { from: c${i}, to: c${i + 1}, diameter: 2 mm, length: 100 mm }`);
  out.push(`simulate: { duration: 1 s, sample: ${sample} }`, '');
  return out.join('\n');
}

function plenum(cwd: string, ...args: string[]): { code: number | null; out: string; err: string } {
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/plenum'), ...args], { cwd, encoding: 'utf8', timeout: 120_000, env: { ...process.env, CI: '1' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('the estimate of the sampled history', () => {
  it('counts samples × channels of the assembled system', () => {
    const model = modelFromText(chain('1 ms'));
    const m = traceMemory(model, { heapBytes: 1e6 }); // small heap: the channels are counted exactly
    expect(m.samples).toBe(1001);
    expect(m.channels).toBe(new NetworkSystem(model).channels().length);
    expect(m.bytes).toBe(m.samples * m.channels * 24);
    expect(traceMemory(model, { heapBytes: 1e6, csv: true }).bytes).toBe(m.samples * m.channels * 72);
  });

  it('refuses what cannot fit, at `sample`, with an interval that fits', () => {
    const model = modelFromText(chain('1 us'));
    const heapBytes = 4e9;
    const d = traceMemoryDiagnostic(model, { heapBytes })!;
    expect(d.code).toBe('too-much-memory');
    expect(d.path).toEqual(['simulate', 'sample']);
    const suggested = Number(/`sample: ([\d.e+-]+) s`/.exec(d.hint!)![1]);
    const fitted = modelFromText(chain(`${suggested} s`));
    expect(traceMemoryDiagnostic(fitted, { heapBytes })).toBeUndefined();
  });
});

describe('the CLI', () => {
  const dir = mkdtempSync(join(tmpdir(), 'plenum-memory-'));
  writeFileSync(join(dir, 'fine.yaml'), chain('1 us'));
  writeFileSync(join(dir, 'ok.yaml'), chain('10 ms'));

  it('run: a 120-chamber chain sampled every microsecond is refused at once (it ran out of heap after minutes)', () => {
    const r = plenum(dir, 'run', 'fine.yaml', '--json', 'out.json');
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/fine\.yaml:\d+:\d+: error \[too-much-memory\] the time history would hold 1000001 samples of \d+ channels/);
    expect(r.err).not.toContain('internal error');
  });

  it('check: the netlist that cannot fit is an invalid case, the others are checked', () => {
    const r = plenum(dir, 'check', 'ok.yaml', 'fine.yaml', '--junit', 'report.xml');
    expect(r.code).toBe(2);
    expect(r.out).toContain('ERROR fine.yaml  invalid netlist');
    expect(r.out).toMatch(/check: .* in 2 netlists: .*1 invalid netlist/);
    expect(readFileSync(join(dir, 'report.xml'), 'utf8')).toMatch(/fine\.yaml[\s\S]*the time history would hold/);
  });
});

describe('plenum check and a worker that runs out of memory', () => {
  it('the netlist it held becomes an error case; the process and the other netlists carry on', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-oom-'));
    // a stand-in for the check worker that takes a netlist and then exhausts its heap
    const hog = join(dir, 'hog-worker.mjs');
    writeFileSync(hog, `import { parentPort, workerData } from 'node:worker_threads';
const ctl = new Int32Array(workerData.control);
const i = Atomics.add(ctl, 0, 1);
if (i < workerData.files.length) {
  parentPort.postMessage({ kind: 'start', index: i });
  const hog = [];
  for (;;) hog.push(new Array(1e6).fill(i));
}
`);
    const slow = join(dir, 'slow.yaml');
    writeFileSync(slow, readFileSync(join(ROOT, 'networks/gripper-charge.yaml'), 'utf8'));
    const files = [slow, join(dir, 'held-by-the-worker.yaml')];
    const results: NetlistCheck[] = [];
    process.env.PLENUM_CHECK_WORKER_HEAP_MB = '32';
    try {
      await runAll(files, 1, hog, new SharedArrayBuffer(8), (i, c) => { results[i] = c; });
    } finally {
      delete process.env.PLENUM_CHECK_WORKER_HEAP_MB;
    }
    expect(results[0].status).toBe('completed');
    expect(results[1].status).toBe('failed');
    expect(results[1].message).toContain('ran out of memory');
    const xml = junitXml(results);
    expect(xml).toContain('held-by-the-worker.yaml');
    expect(xml).toMatch(/ran out of memory/);
  }, 60_000);
});
