/** JUnit XML writer: structure, counts, escaping, XML 1.0 well-formedness (W3C XML 1.0 §2.2, §2.4, §3.1). */
import { describe, expect, it } from 'vitest';
import { junitXml, type NetlistCheck } from '../../src/report/junit.js';
import { children, parseXml, textOf } from './xml.js';

const where = (file: string, line: number) => ({ file, line, column: 5 });

function completed(file: string, results: { name: string; passed: boolean; message?: string }[]): NetlistCheck {
  return {
    file, status: 'completed', message: 'completed', diagnostics: [], unjudged: [], warnings: [], seconds: 0.5,
    expectations: results.map((r, k) => ({ name: r.name, passed: r.passed, actual: 1.5e5, message: r.message ?? `m${k}`, ...where(file, 40 + k) })),
  };
}

describe('the test XML checker itself rejects what XML 1.0 forbids', () => {
  for (const [why, doc] of [
    ['raw ampersand', '<a>x & y</a>'],
    ['raw < in an attribute', '<a b="<"/>'],
    ['bad nesting', '<a><b></a></b>'],
    ['two roots', '<a/><b/>'],
    ['unknown entity', '<a>&nbsp;</a>'],
    ['control character', '<a>\u0001</a>'],
    ['duplicate attribute', '<a b="1" b="2"/>'],
    ['unquoted attribute', '<a b=1/>'],
    ['lone surrogate', '<a>\uD800</a>'],
  ] as const) {
    it(why, () => expect(() => parseXml(doc)).toThrow());
  }
  it('accepts and decodes a well-formed document', () => {
    const r = parseXml('<?xml version="1.0" encoding="UTF-8"?>\n<a x="&quot;&#10;"><b>1 &lt; 2 &amp;&amp; &#x41;</b></a>\n');
    expect(r.attrs.x).toBe('"\n');
    expect(textOf(children(r, 'b')[0])).toBe('1 < 2 && A');
  });
});

describe('junitXml', () => {
  it('writes testsuites > testsuite per netlist > testcase per expectation with counts', () => {
    const xml = junitXml([
      completed('networks/a.yaml', [{ name: 'peak', passed: true }, { name: 'end', passed: false, message: 'cell.gauge at t = 2 s is 12 kPa gauge; expected below 10 kPa gauge' }]),
      completed('networks/b.yaml', [{ name: 'peak', passed: true }]),
    ]);
    const root = parseXml(xml);
    expect(root.name).toBe('testsuites');
    expect(root.attrs).toMatchObject({ tests: '3', failures: '1', errors: '0' });
    const suites = children(root, 'testsuite');
    expect(suites.map((s) => s.attrs.name)).toEqual(['networks/a.yaml', 'networks/b.yaml']);
    expect(suites[0].attrs).toMatchObject({ tests: '2', failures: '1', errors: '0', skipped: '0', time: '0.500' });
    const cases = children(suites[0], 'testcase');
    expect(cases.map((c) => c.attrs.name)).toEqual(['peak', 'end']);
    expect(children(cases[0], 'failure')).toHaveLength(0);
    const f = children(cases[1], 'failure')[0];
    expect(f.attrs.message).toContain('expected below 10 kPa gauge');
    expect(f.attrs.message).toContain('networks/a.yaml:41:5');
    expect(textOf(f)).toContain('actual value (SI): 150000');
    // classnames differ between netlists, so equal expectation names stay distinct
    const ca = children(suites[0], 'testcase')[0].attrs.classname;
    const cb = children(suites[1], 'testcase')[0].attrs.classname;
    expect(ca).toBe('networks.a');
    expect(cb).toBe('networks.b');
  });

  it('escapes & < > " \' and drops characters XML 1.0 does not allow', () => {
    const name = `a & b < c > d "e" 'f'\u0001\u0008\uD800\uFFFE end`;
    const xml = junitXml([completed('n&<m>.yaml', [{ name, passed: false, message: `x < y & "z"\u0000` }])]);
    const root = parseXml(xml);
    const suite = children(root, 'testsuite')[0];
    expect(suite.attrs.name).toBe('n&<m>.yaml');
    const tc = children(suite, 'testcase')[0];
    expect(tc.attrs.name).toBe(`a & b < c > d "e" 'f' end`);
    expect(children(tc, 'failure')[0].attrs.message).toContain('x < y & "z"');
  });

  it('keeps line breaks in attribute values as character references', () => {
    const xml = junitXml([completed('a.yaml', [{ name: 'two\nlines', passed: true }])]);
    expect(xml).toContain('two&#10;lines');
    expect(children(children(parseXml(xml), 'testsuite')[0], 'testcase')[0].attrs.name).toBe('two\nlines');
  });

  it('an invalid netlist and a failed simulation are <error> testcases; unjudged expectations are <skipped>', () => {
    const invalid: NetlistCheck = {
      file: 'bad.yaml', status: 'invalid', message: '1 error in the netlist; nothing was simulated', expectations: [], unjudged: [], warnings: [], seconds: 0.01,
      diagnostics: [{ code: 'unknown-key', severity: 'error', message: 'unknown key `thicknes`', file: 'bad.yaml', line: 7, column: 5, path: ['chambers', 'a'], hint: 'did you mean `thickness`?' }],
    };
    const failed: NetlistCheck = {
      file: 'slow.yaml', status: 'failed', message: 'the simulation stopped at t = 0.2 s of 6 s: step budget used up', expectations: [], diagnostics: [], warnings: [], seconds: 0.3,
      unjudged: [{ name: 'peak', ...where('slow.yaml', 30) }, { name: 'end', ...where('slow.yaml', 34) }],
    };
    const root = parseXml(junitXml([invalid, failed]));
    expect(root.attrs).toMatchObject({ tests: '4', failures: '0', errors: '2', skipped: '2' });
    const [s1, s2] = children(root, 'testsuite');
    const e1 = children(children(s1, 'testcase')[0], 'error')[0];
    expect(e1.attrs.type).toBe('invalid-netlist');
    expect(textOf(e1)).toContain('bad.yaml:7:5: unknown key `thicknes`');
    const c2 = children(s2, 'testcase');
    expect(c2.map((c) => c.attrs.name)).toEqual(['[simulation]', 'peak', 'end']);
    expect(children(c2[0], 'error')[0].attrs.message).toContain('step budget');
    expect(children(c2[1], 'skipped')).toHaveLength(1);
    expect(s2.attrs).toMatchObject({ tests: '3', errors: '1', skipped: '2' });
  });

  it('gives netlists whose paths map to the same classname distinct classnames', () => {
    const root = parseXml(junitXml([completed('a/b.yaml', [{ name: 'x', passed: true }]), completed('a.b.yaml', [{ name: 'x', passed: true }])]));
    const [c1, c2] = children(root, 'testsuite').map((s) => children(s, 'testcase')[0].attrs.classname);
    expect(c1).not.toBe(c2);
  });
});
