/**
 * Openings and schedules, shared by valves and feeds.
 *
 * A schedule is a list of steps `{ at, open, over }`: from time `at`, the opening ramps
 * linearly to `open` over `over` seconds (`over: 0` or omitted is a step). Steps must be in
 * time order (`at` non-decreasing); a step that starts while an earlier ramp is still running
 * takes over from the opening reached.
 */
import type { Checker } from './checker.js';
import { SCHEDULE_STEP } from './kinds.js';
import type { ScheduleStep } from './types.js';
import type { YNode } from './yaml-types.js';

const OPENING_WORDS: Record<string, number> = { open: 1, closed: 0 };
const SCHEDULE_HINT = 'write e.g. `schedule: [{ at: 1 s, open: 100%, over: 50 ms }, { at: 3 s, open: closed }]`';

/** `open`, `closed`, `40%` or 0..1 → 0..1. */
export function readOpening(ck: Checker, node: YNode, what: string): number | undefined {
  if (node.kind === 'scalar' && typeof node.value === 'string' && Object.hasOwn(OPENING_WORDS, node.value.trim())) {
    return OPENING_WORDS[node.value.trim()];
  }
  return ck.fraction(node, what);
}

export function readSchedule(ck: Checker, node: YNode): ScheduleStep[] | undefined {
  const seq = ck.seq(node, '`schedule`', SCHEDULE_HINT);
  if (!seq) return undefined;
  const steps: ScheduleStep[] = [];
  let ok = true;
  let lastAt = -Infinity;
  for (const item of seq.items) {
    const map = ck.map(item, 'a schedule step', SCHEDULE_HINT);
    if (!map) {
      ok = false;
      continue;
    }
    ck.checkKeys(map, SCHEDULE_STEP.params.map((p) => p.name), 'a schedule step');
    const v = ck.params(map, SCHEDULE_STEP.params);
    const openNode = v.open as YNode | undefined;
    const open = openNode ? readOpening(ck, openNode, '`open`') : undefined;
    const at = v.at as number | undefined;
    const over = v.over as number | undefined;
    if (at !== undefined && at < lastAt) {
      ck.error(ck.get(map, 'at') ?? map, 'schedule-order', `schedule step at ${at} s comes before the previous step at ${lastAt} s`, 'list the steps in time order (non-decreasing `at`)');
      ok = false;
    }
    if (at !== undefined) lastAt = Math.max(lastAt, at);
    if (at === undefined || open === undefined || over === undefined) {
      ok = false;
      continue;
    }
    steps.push({ at, open, over });
  }
  return ok ? steps : undefined;
}
