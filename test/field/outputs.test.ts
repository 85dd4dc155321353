/**
 * Outputs a user can work from alone: valve openings and relief/check states in the CSV and
 * JSON, the flow sign convention in the printed table (item 18); the report's expectations,
 * outcome, warnings and valve symbols (item 19); the report of a large network (item 20).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { equilibriaText, findEquilibria, reportHtml, reportInput, summaryText, traceCsv } from '../../src/index.js';
import { channel, modelFromFile, modelFromText, runChecked } from '../helpers.js';

describe('valve openings and states in CSV and JSON (item 18)', () => {
  const r = runChecked(modelFromFile('networks/gripper-charge.yaml'));

  it('the CSV has each valve\'s opening (0–1) and the relief valve\'s state; the scheduled ramp plots from it', () => {
    const head = traceCsv(r.trace).split('\n')[0]?.split(',') ?? [];
    expect(head).toContain('solenoid.opening [-]');
    expect(head).toContain('relief.opening [-]');
    expect(head).toContain('relief.open [-]');
    // the solenoid ramps 0 → 100 % over 5 ms from 50 ms (the netlist's schedule), linearly
    const t = r.trace.times;
    const open = channel(r, 'solenoid.opening');
    const at = (x: number): number => open[t.findIndex((s) => Math.abs(s - x) < 1e-9)] ?? Number.NaN;
    expect(at(0.05)).toBe(0);
    for (const k of [1, 2, 3, 4]) expect(at(0.05 + k * 0.001)).toBeCloseTo(k / 5, 12);
    expect(at(0.055)).toBe(1);
    expect(at(0.9)).toBe(0);
    // the relief valve's state is 0 or 1 and is 1 exactly where its opening is
    const state = channel(r, 'relief.open');
    expect(new Set(state)).toEqual(new Set([0, 1]));
    expect(state).toEqual(channel(r, 'relief.opening'));
  });

  it('JSON valves carry the opening range and, for relief and check valves, the state at the end and how often they opened', () => {
    const v = r.valves;
    expect(v['solenoid']?.opening).toEqual({ final: 0, min: 0, max: 1 });
    expect(v['relief']?.open_at_end).toBe(false);
    const opens = r.events.filter((e) => e.what === 'relief valve relief opens').length;
    expect(opens).toBeGreaterThan(0);
    expect(v['relief']?.times_opened).toBe(opens);
  });

  it('the printed table states the sign convention of flows', () => {
    const text = summaryText(r);
    expect(text).toMatch(/^line\s+peak flow \(\+ from→to\)/m);
    expect(text).toMatch(/^valve\s+peak flow \(\+ from→to\)\s+choked\s+opening/m);
  });
});

describe('the report: expectations, outcome, warnings, valve symbols (item 19)', () => {
  function report(file: string, edit: (s: string) => string = (s) => s): { out: string; err: string; code: number } {
    const dir = mkdtempSync(join(tmpdir(), 'plenum-report-'));
    const f = join(dir, 'rig.yaml');
    writeFileSync(f, edit(readFileSync(file, 'utf8')));
    const r = spawnSync(process.execPath, ['bin/plenum', 'report', f, '--out', '-', '-q'], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
    return { out: r.stdout, err: r.stderr, code: r.status ?? -1 };
  }

  it('draws a check valve and a relief valve with their own symbols', () => {
    const check = report('networks/manifold-mixed.yaml');
    expect(check.code, check.err).toBe(0);
    expect(check.out).toContain('class="valve valve-check"');
    const relief = report('networks/gripper-charge.yaml');
    expect(relief.out).toContain('class="valve valve-relief"');
    expect(relief.out).toContain('class="valve valve-schedule"');
  });

  it('shows actual values in the expectation\'s unit, wraps long messages, and says how the run ended', () => {
    const r = report('networks/gripper-charge.yaml');
    const checks = r.out.slice(r.out.indexOf('id="checks"'), r.out.indexOf('id="warnings"'));
    // the gauge probe's actual in kPa gauge, not 1.5e+5 (raw SI)
    expect(checks).toMatch(/<td>[\d.]+ kPa gauge<\/td>/);
    expect(checks).not.toMatch(/<td>\d(\.\d+)?e\+\d+<\/td>/);
    // message and place cells wrap (class text), and the style lets a first column wrap
    expect(checks).toMatch(/<td class="text"><b>/);
    expect(r.out).toContain('td.text, td.text:first-child { white-space: normal; overflow-wrap: anywhere; }');
    expect(r.out).toMatch(/How it ended: supply, finger \(open\): settled within 2 % by [\d.]+ ms\./);
  });

  it('lists the netlist\'s own warnings under Warnings and safety', () => {
    // a thick wall (t0/r0 above 0.1) draws a netlist warning
    const r = report('networks/gripper-charge.yaml', (s) => s.replace('thickness: 1 mm', 'thickness: 2.5 mm'));
    expect(r.code, r.err).toBeLessThanOrEqual(1);
    expect(r.err).toContain('warning');
    const section = r.out.slice(r.out.indexOf('id="warnings"'));
    expect(section).toMatch(/<li>netlist: [^<]*rig\.yaml:\d+:\d+: warning/);
  });
});

describe('equilibria for the gas the run ends with (item 14)', () => {
  const model = modelFromFile('networks/gripper-charge.yaml');

  it('default: the gas at the end of a run open to a reservoir or feed, and the transient reaches a listed equilibrium', () => {
    const r = findEquilibria(model);
    expect(r.gas).toBe('end');
    expect(r.transient?.reached).not.toBeNull();
    expect(equilibriaText(r)).toContain('gas as held at the end of the transient');
  });

  it('--gas start is kept, and says so', () => {
    const r = findEquilibria(model, { gas: 'start' });
    expect(r.gas).toBe('start');
    expect(equilibriaText(r)).toContain('gas as held at the start');
  });

  it('a closed network keeps the gas at the start (the same gas) by default', () => {
    expect(findEquilibria(modelFromFile('networks/cushion-runaway.yaml')).gas).toBe('start');
  });

  it('the report\'s pressure–volume chart says whose gas its equilibrium marks hold', () => {
    const r = spawnSync(process.execPath, ['bin/plenum', 'report', 'networks/gripper-charge.yaml', '--out', '-', '-q'], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
    expect(r.stdout).toContain('Equilibria (stable filled, unstable hollow) for the gas the chambers hold at the end of the run.');
  });
});

describe('a report at scale groups chambers that behave alike (item 20)', () => {
  /** A chain of 300: rigid tanks and rubber pods started past their pressure maximum, alternating. */
  function chain(n: number): string {
    const out = ['format: 1\ntitle: chain of pods\nchambers:\n'];
    for (let i = 0; i < n; i++) {
      out.push(i % 2 === 1
        ? `  s${i}: { wall: neo-hookean, radius: 15 mm, thickness: 1 mm, shear-modulus: 0.3 MPa, start: { stretch: 1.5 } }\n`
        : `  s${i}: { wall: rigid, volume: 20 mL, start: { pressure: 0 kPa gauge } }\n`);
    }
    out.push('lines:\n');
    for (let i = 0; i + 1 < n; i++) out.push(`  l${i}: { from: s${i}, to: s${i + 1}, diameter: 2 mm, length: 100 mm }\n`);
    out.push('simulate: { duration: 0.2 s, sample: 10 ms }\n');
    return out.join('');
  }

  it('"at a glance" names a handful of chambers and counts the rest', () => {
    const model = modelFromText(chain(300));
    const r = runChecked(model);
    const html = reportHtml(reportInput(model, r));
    const glance = html.slice(html.indexOf('id="glance"'), html.indexOf('id="figures"'));
    const findings = glance.slice(0, glance.indexOf('</ul>'));
    expect(findings).toMatch(/1\d\d chambers stay past the pressure maximum of their wall law \(<b>s\d+<\/b>, <b>s\d+<\/b>, <b>s\d+<\/b>, …, <b>s299<\/b>\)/);
    expect(findings).toMatch(/\d+ chambers lost [\d.]+ \w?g of gas in all \([\d.]+–[\d.]+ % each\)/);
    expect(findings).toMatch(/\d+ chambers gained [\d.]+ \w?g of gas in all/);
    // two screens of names before; now a few dozen at most
    expect((findings.match(/<b>s\d+<\/b>/g) ?? []).length).toBeLessThan(20);
  }, 120_000);
});
