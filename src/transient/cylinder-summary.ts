/**
 * A cylinder's run in a few numbers, from the mode changes its element recorded (impacts,
 * starts, sticking) and the extremes seen at every step and sample.
 *
 * A stroke is counted from the last start off one stop to the arrival at the other; a piston
 * that begins mid-stroke, or stops on the way, completes no stroke until it travels stop to
 * stop. Time stuck is time at rest inside the stroke (stops excluded), held by static friction.
 */
import type { PistonRecord } from '../elements/cylinder.js';
import type { CylinderSummary } from './results.js';

export interface CylinderRun {
  records: readonly PistonRecord[];
  stroke: number;
  x0: number;
  /** Whether the piston was stuck inside the stroke at the start. */
  stuckAtStart: boolean;
  tEnd: number;
  final: { position: number; velocity: number; dissipated: number };
  peak: { velocity: number; at: number };
}

export function summarizeCylinder(run: CylinderRun): CylinderSummary {
  const { records, stroke } = run;
  const impacts: CylinderSummary['impacts'] = [];
  const strokes: CylinderSummary['strokes'] = [];
  /** The last start off a stop: its time and which stop (−1 retracted, +1 full). */
  let leftStop: { t: number; from: -1 | 1 } | null = null;
  let stuckSince: number | null = run.stuckAtStart ? 0 : null;
  let stuck = 0;
  for (const r of records) {
    if (r.what === 'start') {
      if (stuckSince !== null) { stuck += r.t - stuckSince; stuckSince = null; }
      leftStop = r.x <= 0 ? { t: r.t, from: -1 } : r.x >= stroke ? { t: r.t, from: 1 } : null;
    } else if (r.what === 'stick') {
      stuckSince = r.t;
      leftStop = null;
    } else {
      impacts.push({ t: r.t, stop: r.stop === 1 ? 'full' : 'retracted', velocity: r.value });
      if (leftStop && leftStop.from === -(r.stop as number)) {
        strokes.push({ direction: r.stop === 1 ? 'extend' : 'retract', started: leftStop.t, reached: r.t, time: r.t - leftStop.t, impact_velocity: r.value });
      }
      leftStop = null;
    }
  }
  if (stuckSince !== null) stuck += run.tEnd - stuckSince;
  return {
    start: { position: run.x0 },
    final: { position: run.final.position, velocity: run.final.velocity },
    peak: run.peak,
    strokes,
    impacts,
    stroke_time: strokes.length ? strokes[0].time : null,
    time_stuck: stuck,
    dissipated: run.final.dissipated,
  };
}
