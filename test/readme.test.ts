/** The README's element table is generated from the parameter tables: it must be current. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { kindsText } from '../src/cli/kinds.js';

describe('README', () => {
  it('element table matches `plenum kinds --markdown` (run `npm run readme` to refresh)', () => {
    const readme = readFileSync('README.md', 'utf8');
    const m = /<!-- kinds:begin -->\n([\s\S]*)<!-- kinds:end -->/.exec(readme);
    expect(m).not.toBeNull();
    expect(m![1]).toBe(kindsText(true));
  });

  it('quick start names an example that exists', () => {
    const readme = readFileSync('README.md', 'utf8');
    const m = /npx plenum run (networks\/[\w-]+\.yaml)/.exec(readme);
    expect(m).not.toBeNull();
    expect(() => readFileSync(m![1])).not.toThrow();
  });
});
