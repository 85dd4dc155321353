/**
 * A cylinder's run in a few numbers: the strokes and impacts its element recorded, the time it
 * spent stuck inside the stroke, and the extremes seen at every step and sample.
 *
 * Time stuck is time at rest inside the stroke (stops excluded), held by static friction.
 */
import type { CylinderState } from './cylinder.js';

/** What a cylinder did during a run: JSON `cylinders.<name>` (SI). */
export interface CylinderSummary {
  start: { position: number };
  final: { position: number; velocity: number };
  /** Largest speed reached (signed: positive extending) and when. */
  peak: { velocity: number; at: number };
  /** Completed strokes: from leaving one stop to reaching the other. */
  strokes: { direction: 'extend' | 'retract'; started: number; reached: number; time: number; impact_velocity: number }[];
  /** Every contact with a stop, with the velocity just before it (signed). */
  impacts: { t: number; stop: 'full' | 'retracted'; velocity: number }[];
  /** Duration of the first completed stroke, s; null when none completed. */
  stroke_time: number | null;
  /** Time held at rest inside the stroke by static friction, s. */
  time_stuck: number;
  /** Energy dissipated by friction and impacts, J. */
  dissipated: number;
}

export interface CylinderRun {
  /** Whether the piston was stuck inside the stroke at the start. */
  stuckAtStart: boolean;
  tEnd: number;
  final: { position: number; velocity: number; dissipated: number };
  peak: { velocity: number; at: number };
}

export function summarizeCylinder(el: CylinderState, run: CylinderRun): CylinderSummary {
  let stuckSince: number | null = run.stuckAtStart ? 0 : null;
  let stuck = 0;
  const impacts: CylinderSummary['impacts'] = [];
  for (const r of el.records) {
    if (r.what === 'stick') stuckSince = r.t;
    else if (stuckSince !== null) { stuck += r.t - stuckSince; stuckSince = null; }
    if (r.what === 'impact') impacts.push({ t: r.t, stop: r.stop === 1 ? 'full' : 'retracted', velocity: r.value });
  }
  if (stuckSince !== null) stuck += run.tEnd - stuckSince;
  return {
    start: { position: el.c.x0 },
    final: { position: run.final.position, velocity: run.final.velocity },
    peak: run.peak,
    strokes: el.strokes.slice(),
    impacts,
    stroke_time: el.strokes.length ? el.strokes[0].time : null,
    time_stuck: stuck,
    dissipated: run.final.dissipated,
  };
}
