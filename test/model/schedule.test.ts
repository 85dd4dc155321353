import { describe, expect, it } from 'vitest';
import { makeSchedule } from '../../src/model/schedule.js';

describe('valve schedules', () => {
  it('holds the initial value, ramps linearly, and holds the target', () => {
    const s = makeSchedule(0, [{ at: 1, open: 1, over: 0.5 }]);
    expect(s.at(0.5)).toBe(0);
    expect(s.at(1)).toBe(0);
    expect(s.at(1.25)).toBeCloseTo(0.5, 15);
    expect(s.at(1.5)).toBe(1);
    expect(s.at(9)).toBe(1);
    expect(s.breakpoints).toEqual([1, 1.5]);
  });

  it('a step with zero ramp time switches at once', () => {
    const s = makeSchedule(1, [{ at: 2, open: 0, over: 0 }]);
    expect(s.at(1.999)).toBe(1);
    expect(s.at(2)).toBe(0);
    expect(s.breakpoints).toEqual([2]);
  });

  it('a step that starts during a ramp takes over from the value reached', () => {
    const s = makeSchedule(0, [{ at: 0, open: 1, over: 1 }, { at: 0.5, open: 0, over: 0.5 }]);
    expect(s.at(0.5)).toBeCloseTo(0.5, 15);
    expect(s.at(0.75)).toBeCloseTo(0.25, 15);
    expect(s.at(1)).toBe(0);
    expect(s.breakpoints).toEqual([0, 0.5, 1]);
  });
});
