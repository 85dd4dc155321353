/** Every example netlist runs clean: completes, conserves mass, meets its own expectations. */
import { readdirSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { modelFromFile, runChecked } from './helpers.js';

const files = readdirSync('networks').filter((f) => f.endsWith('.yaml'));

describe('networks/', () => {
  it('holds at least four examples', () => {
    expect(files.length).toBeGreaterThanOrEqual(4);
  });
  for (const f of files) {
    it(`${f} runs clean`, () => {
      const r = runChecked(modelFromFile(`networks/${f}`));
      for (const e of r.expectations) expect(e.passed, `${e.name}: ${e.message}`).toBe(true);
      expect(r.expectations.length).toBeGreaterThan(0);
    });
  }
});
