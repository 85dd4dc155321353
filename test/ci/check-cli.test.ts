/**
 * `plenum check` as CI runs it, through the bundled CLI (bin/plenum → dist/): exit codes and
 * their precedence, one line per expectation and a tally, JUnit XML that parses, annotations,
 * and the same outcome whether the netlists run on one thread or several.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { modelFromFile } from '../helpers.js';
import { children, parseXml, textOf, type XmlElement } from './xml.js';

function plenum(...args: string[]): { code: number; out: string; err: string } {
  const r = spawnSync(process.execPath, ['bin/plenum', ...args], { encoding: 'utf8', env: { ...process.env, CI: '1' } });
  return { code: r.status ?? -1, out: r.stdout, err: r.stderr };
}

const tmp = mkdtempSync(join(tmpdir(), 'plenum-check-'));
const examples = readdirSync('networks').filter((f) => f.endsWith('.yaml')).sort().map((f) => `networks/${f}`);

/** A copy of an example netlist with one text replacement (which must apply). */
function variant(name: string, from: string, find: string, replace: string): string {
  const src = readFileSync(from, 'utf8');
  expect(src).toContain(find);
  const f = join(tmp, name);
  writeFileSync(f, src.replace(find, replace));
  return f;
}

const gripperTooLow = (): string => variant('gripper-slow.yaml', 'networks/gripper-charge.yaml', 'above: 40 kPa gauge', 'above: 400 kPa gauge');
const invalid = (): string => variant('typo.yaml', 'networks/cushion-settle.yaml', '    thickness: 1.5 mm\n    shear', '    thicknes: 1.5 mm\n    shear');
const budget = (): string => variant('budget.yaml', 'networks/cushion-runaway.yaml', 'tolerance: 1e-7 }', 'tolerance: 1e-7, max-steps: 30 }');

function junit(file: string): XmlElement {
  return parseXml(readFileSync(file, 'utf8'));
}

const lineOf = (text: string, find: string): number => text.split('\n').findIndex((l) => l.includes(find)) + 1;

describe('plenum check', () => {
  it('a passing set exits 0 with one line per expectation, a tally and a JUnit report without failures', () => {
    const report = join(tmp, 'pass.xml');
    const r = plenum('check', ...examples, '--junit', report);
    expect(r.code, r.out + r.err).toBe(0);
    const total = examples.reduce((s, f) => s + modelFromFile(f).expect.length, 0);
    const lines = r.out.trim().split('\n');
    expect(lines.filter((l) => l.startsWith('pass  '))).toHaveLength(total);
    expect(lines.filter((l) => l.startsWith('FAIL'))).toHaveLength(0);
    expect(lines[lines.length - 1]).toMatch(new RegExp(`^check: ${total} expectations in ${examples.length} netlists: ${total} passed, 0 failed; 0 invalid netlists, 0 simulations did not complete`));
    const root = junit(report);
    expect(root.attrs).toMatchObject({ tests: String(total), failures: '0', errors: '0' });
    expect(children(root, 'testsuite').map((s) => s.attrs.name)).toEqual(examples);
  });

  it('a failing expectation exits 1; its line and JUnit failure give expected, actual with units, time and file:line:column', () => {
    const f = gripperTooLow();
    const report = join(tmp, 'fail.xml');
    const r = plenum('check', 'networks/cushion-settle.yaml', f, '--junit', report);
    expect(r.code, r.out + r.err).toBe(1);
    const line = lineOf(readFileSync(f, 'utf8'), 'probe: finger.gauge') - 1; // the list item starts a line above
    const fail = r.out.split('\n').filter((l) => l.startsWith('FAIL'));
    expect(fail).toHaveLength(1);
    expect(fail[0]).toContain(`${f}:${line}:5`);
    expect(fail[0]).toMatch(/finger\.gauge at t = 350 ms is [\d.]+ kPa gauge; expected above 400 kPa gauge/);
    expect(r.out).toMatch(/check: 5 expectations in 2 netlists: 4 passed, 1 failed; 0 invalid netlists, 0 simulations did not complete/);
    const root = junit(report);
    expect(root.attrs).toMatchObject({ tests: '5', failures: '1', errors: '0' });
    const suite = children(root, 'testsuite')[1];
    expect(suite.attrs).toMatchObject({ name: f, tests: '3', failures: '1' });
    const failed = children(suite, 'testcase').filter((c) => children(c, 'failure').length);
    expect(failed).toHaveLength(1);
    expect(failed[0].attrs.name).toBe('the finger reaches gripping pressure within 300 ms of the valve opening');
    const failure = children(failed[0], 'failure')[0];
    expect(failure.attrs.message).toMatch(/is [\d.]+ kPa gauge; expected above 400 kPa gauge/);
    expect(failure.attrs.message).toContain('t = 350 ms');
    expect(failure.attrs.message).toContain(`${f}:${line}:5`);
    expect(textOf(failure)).toMatch(/actual value \(SI\): [\d.]+/);
  });

  it('exit codes: an invalid netlist (2) outranks a failed simulation (3), which outranks a failed expectation (1)', () => {
    const bad = invalid();
    const slow = budget();
    const low = gripperTooLow();
    const report = join(tmp, 'all.xml');
    const all = plenum('check', low, slow, bad, '--junit', report);
    expect(all.code).toBe(2);
    expect(all.out).toMatch(/^ERROR .*typo\.yaml {2}invalid netlist/m);
    expect(all.out).toMatch(/typo\.yaml:\d+:\d+: error \[unknown-key\]/);
    expect(all.out).toMatch(/^ERROR .*budget\.yaml {2}the simulation stopped before the end \(8 s\): step budget/m);
    expect(all.out).toMatch(/^skip {2}.*budget\.yaml:\d+:5 {2}/m);
    // the report is written whatever the exit code; errors are <error> testcases
    const root = junit(report);
    expect(root.attrs).toMatchObject({ failures: '1', errors: '2', skipped: '3' });
    const suites = children(root, 'testsuite');
    expect(children(children(suites[2], 'testcase')[0], 'error')[0].attrs.type).toBe('invalid-netlist');
    expect(children(children(suites[1], 'testcase')[0], 'error')[0].attrs.message).toContain('max-steps');
    expect(plenum('check', low, slow).code).toBe(3);
    expect(plenum('check', low, 'networks/cushion-settle.yaml').code).toBe(1);
    expect(plenum('check', join(tmp, 'missing.yaml')).code).toBe(2);
  });

  it('one thread and several give the same lines, in the order given', () => {
    const files = [gripperTooLow(), ...examples];
    const strip = (s: string): string => s.replace(/\(\d+ jobs?, [\d.]+ s\)/, '');
    const one = plenum('check', ...files, '--jobs', '1');
    const many = plenum('check', ...files, '--jobs', '3');
    expect(one.code).toBe(1);
    expect(many.code).toBe(1);
    expect(strip(many.out)).toBe(strip(one.out));
    expect(many.out).toContain('(3 jobs,');
    const order = one.out.split('\n').filter((l) => /^(pass|FAIL)/.test(l)).map((l) => l.split(/\s+/)[1].replace(/:\d+:\d+$/, ''));
    expect([...new Set(order)]).toEqual(files);
  });

  it('--annotations prints workflow-command annotations for failures; -q prints only failures and the tally', () => {
    const f = gripperTooLow();
    const r = plenum('check', f, '--annotations', '-q');
    expect(r.code).toBe(1);
    // the failure, as an error (the example's feed tube also draws a wave-travel warning)
    const ann = r.out.split('\n').filter((l) => l.startsWith('::error'));
    expect(ann).toHaveLength(1);
    expect(ann[0]).toMatch(new RegExp(`^::error file=${f.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')},line=\\d+,col=5,title=expectation failed%3A the finger reaches gripping pressure within 300 ms of the valve opening::finger\\.gauge at t = 350 ms`));
    expect(r.out).not.toMatch(/^pass/m);
  });

  it('expectation names with markup characters and control characters still give well-formed JUnit', () => {
    const f = variant('names.yaml', 'networks/cushion-settle.yaml', 'name: the cells meet at equal pressure', 'name: "a <b> & \\"c\\" \'d\' \\x01 end"');
    const report = join(tmp, 'names.xml');
    const r = plenum('check', f, '--junit', report);
    expect(r.code, r.out + r.err).toBe(0);
    const tc = children(children(junit(report), 'testsuite')[0], 'testcase');
    expect(tc.map((c) => c.attrs.name)).toContain(`a <b> & "c" 'd'  end`);
  });

  it('a directory stands for its netlists; a report path that is a netlist is refused', () => {
    const r = plenum('check', 'networks', '-q');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(new RegExp(`in ${examples.length} netlists`));
    const guard = plenum('check', 'networks/cushion-settle.yaml', '--junit', 'networks/cushion-settle.yaml');
    expect(guard.code).toBe(2);
    expect(readFileSync('networks/cushion-settle.yaml', 'utf8')).toContain('format: 1');
  });
});
