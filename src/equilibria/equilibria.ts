/**
 * Equilibria of a network and their stability: where the gas can come to rest, which of those
 * rest states are stable, and which one the transient from the start reaches.
 *
 * Setting. Valves stand as chosen (`open`, `closed`, or as they are at the end of their
 * schedules); feeds run at their end-of-schedule rate; time-varying reservoirs are taken at the
 * end of the simulation. Chambers fall into groups joined by lines and open valves. Check and
 * relief valves pass no gas at rest (a check valve holds up to its cracking pressure, a relief
 * valve is shut below its set point), so they separate groups, each keeping its own gas; an
 * equilibrium at which one of them would open is marked inconsistent. Exception: a group that is
 * fed and has no other outlet reaches a steady state only by discharging through its check or
 * relief valves, which then count as passing gas.
 *
 * - closed group (no reservoir, no running feed): every chamber has the same pressure p (no
 *   flow through lines and open valves means no pressure difference across them) and the
 *   masses add up to the gas the group holds, Σ m_i(p) = M. Each elastic wall gives a chamber
 *   several volumes at one pressure, one on each monotone segment of its pressure–volume curve
 *   (rising, falling past a maximum, rising again past a minimum); on each segment m_i(p) is
 *   monotone (increasing on rising, decreasing on falling segments, because the mass grows
 *   with volume, see physics/wall.ts). For every combination of segments, the roots of
 *   Σ m_i(p) − M are bracketed on a grid of pressures that contains each segment's samples
 *   (Chebyshev-clustered towards the extrema, where m(p) has a square-root end) and each
 *   sign change of the derivative Σ dm_i/dp, then refined by Brent's method. Each segment is
 *   cut where the chamber alone would hold all the gas, so the search range is finite and
 *   exhaustive. Combinations are pruned when the chambers chosen so far already hold more than
 *   M. Above `maxCombinations` combinations a group is searched instead by deflated Newton
 *   iteration on the same equations in mass coordinates (Σm = M, p_i = p_1) from many starts:
 *   the start and end states, then segment combinations in order of how many chambers sit off
 *   their first (rising) segment (none, one, two, ...: the states an engineer meets first, and
 *   among them the stable ones), for half the starts, then random combinations; each start is
 *   the combination's masses at the pressure in its common range where they come closest to M.
 *   Deflation keeps Newton from converging again to a state already found. That list may be
 *   incomplete and is marked so.
 * - open group (touching reservoirs, possibly fed): the pressures follow from the steady flow
 *   balance (all equal to the reservoir pressure when there is one reservoir and no feed),
 *   solved by Newton–Levenberg–Marquardt iteration on the chamber pressures; each chamber then
 *   independently takes any volume its wall allows at its pressure.
 * - fed group with no outlet: no steady state.
 * Groups do not interact at rest, so the network's equilibria are all combinations of the
 * groups' ones, and its linearisation is block diagonal: eigenvalues are the union over
 * groups, and a network equilibrium is stable when every group's part is.
 *
 * Heat. Isothermal models rest at each chamber's own temperature. With `heat: exchange` the
 * gas rests at ambient temperature, and stability comes from the full (mass, temperature)
 * linearisation. With `heat: adiabatic` the resting temperatures depend on the path (no heat
 * leaves), so the isothermal equilibria at ambient temperature are computed, and their
 * stability is that of isothermal gas (the state a long-lived system reaches as heat leaks).
 *
 * References: Müller & Strehlow, Rubber and Rubber Balloons, Springer LNP 637, 2004 (rest states
 * of communicating balloons, from memory); Brent 1973, ch. 4 (roots); Farrell, Birkisson &
 * Funke, SIAM J. Sci. Comput. 37 (2015) A2026 (deflation, shifted operator with p = 2, σ = 1);
 * Nocedal & Wright, Numerical Optimization, 2nd ed., §10.3 (Levenberg–Marquardt).
 */
import { chamberGroups, everConducts } from '../model/groups.js';
import { cylinderRests } from './cylinder-rest.js';
import type { Model, NodeRef } from '../model/types.js';
import type { RunResult } from '../transient/results.js';
import { simulate } from '../transient/transient.js';
import { groupEquilibria, groupMassesOf, oneWayChecks, worst } from './group.js';
import { hasLoopStates, loopEquilibria } from './closed-loop.js';
import { restSetup, type RestGroup, type RestSetup } from './rest.js';
import type { StabilityVerdict } from './stability.js';
import { DEFAULT_MAX_COMBINATIONS, DEFAULT_MAX_LISTED, DEFAULT_MAX_WALL, REACHED, TRANSIENT_SHARE, type ChamberRest, type EquilibriaOptions, type EquilibriaResult, type GroupEquilibrium, type GroupResult, type NetworkEquilibrium, type TransientMatch } from './types.js';

export { restSetup } from './rest.js';
export { groupEquilibria } from './group.js';
export { groupStability } from './rest-stability.js';
export type {
  EquilibriaOptions, EquilibriaResult, NetworkEquilibrium, GroupResult, GroupEquilibrium, ChamberRest, TransientMatch, ValveState, GasSource,
} from './types.js';

/** Combines one equilibrium per group into a network equilibrium. */
function combine(setup: RestSetup, groups: GroupResult[], members: number[]): NetworkEquilibrium {
  const chambers: Record<string, ChamberRest> = {};
  const pressures = new Float64Array(setup.chambers.length).fill(Number.NaN);
  let verdict: StabilityVerdict = 'stable';
  let growth: number | null = null;
  let tau: number | null = null;
  const eig: { re: number; im: number }[] = [];
  groups.forEach((g, gi) => {
    const e = g.equilibria[members[gi]];
    const rg = setup.groups[gi];
    e.chambers.forEach((c, i) => {
      chambers[g.chambers[i]] = c;
      pressures[rg.chambers[i]] = c.pressure;
    });
    const st = e.stability;
    verdict = worst(verdict, st.ok ? st.stability : 'marginal');
    if (st.growth_rate !== null) growth = growth === null ? st.growth_rate : Math.max(growth, st.growth_rate);
    if (st.time_constant !== null) tau = tau === null ? st.time_constant : Math.max(tau, st.time_constant);
    eig.push(...st.eigenvalues);
  });
  eig.sort((a, b) => b.re - a.re || b.im - a.im);
  const warnings = oneWayChecks(setup, pressures);
  const notes = groups.map((g, gi) => g.equilibria[members[gi]].note).filter((x): x is string => Boolean(x));
  // order chambers as in the netlist
  const ordered: Record<string, ChamberRest> = {};
  for (const c of setup.model.chambers) if (chambers[c.name]) ordered[c.name] = chambers[c.name];
  return {
    chambers: ordered, stable: verdict === 'stable', stability: verdict, growth_rate: growth, time_constant: tau,
    eigenvalues: eig, members: [...members], consistent: warnings.length === 0, warnings, notes,
  };
}

/** Largest chamber mass difference between a state and a group equilibrium, as a fraction of the group's gas. */
function distanceTo(g: RestGroup, e: GroupEquilibrium, masses: ArrayLike<number>): number {
  const total = g.chambers.reduce((a, c) => a + Math.abs(masses[c]), 0) || 1;
  let d = 0;
  g.chambers.forEach((c, i) => { d = Math.max(d, Math.abs(masses[c] - e.chambers[i].mass) / total); });
  return d;
}

/** True when a group of chambers exchanges gas with a reservoir or a feed at some time in the run. */
export function openDuringRun(model: Model): boolean {
  const feedActive = (k: number): boolean => model.feeds[k]!.initially > 0 || model.feeds[k]!.steps.some((s) => s.open > 0);
  return chamberGroups(model, everConducts, feedActive).some((g) => g.reservoirs.length > 0 || g.feeds.length > 0);
}

/**
 * Every equilibrium of the network (up to the stated limits), its stability, and which one the
 * transient from the start state reaches.
 */
export function findEquilibria(model: Model, options: EquilibriaOptions = {}): EquilibriaResult {
  const valves = options.valves ?? 'end';
  // default: the gas at the end of the run when some group exchanged gas with a reservoir or a
  // feed during it (the start state's gas is then not where the run ends: a gripper charged
  // from a supply holds far more gas at the end); else the gas at the start, which is the same
  const gas = options.gas ?? (options.masses || !openDuringRun(model) ? 'start' : 'end');
  const maxCombinations = options.maxCombinations ?? DEFAULT_MAX_COMBINATIONS;
  const maxListed = options.maxListed ?? DEFAULT_MAX_LISTED;
  const maxWall = options.maxWall ?? DEFAULT_MAX_WALL;
  const deadline = performance.now() + maxWall * 1000;
  const setup = restSetup(model, valves);
  const notes = [...setup.notes];

  let run: RunResult | null = null;
  if (options.transient !== false || (gas === 'end' && !options.masses)) {
    // the transient may use half the budget (less when the netlist's own max-wall is smaller)
    const share = (TRANSIENT_SHARE * maxWall);
    const own = model.simulate.maxWall;
    run = simulate(own !== undefined && own <= share ? model : { ...model, simulate: { ...model.simulate, maxWall: share } });
    if (run.status === 'failed' && (own === undefined || own > share) && /max-wall|wall/i.test(run.message)) {
      notes.push(`the transient was stopped at ${+run.end.toPrecision(4)} s by its share of the time budget (${+share.toPrecision(3)} s of ${+maxWall.toPrecision(3)} s; --max-wall)`);
    }
  }
  const endMasses = run ? Float64Array.from(model.chambers.map((c) => run!.chambers[c.name].final.mass)) : null;
  let masses: Float64Array;
  if (options.masses) masses = Float64Array.from(options.masses);
  else if (gas === 'end' && endMasses) masses = endMasses;
  else masses = Float64Array.from(model.chambers.map((c) => c.m0));
  if (gas === 'start' && !options.masses) {
    const closing = model.branches.filter((b, k) => b.valve?.operation.kind === 'schedule' && everConducts(b) && b.from.kind !== 'port' && b.to.kind !== 'port'
      && (setup.model.branches[k].valve!.operation as { initially: number }).initially === 0);
    if (closing.length) notes.push(`${closing.map((b) => b.name).join(', ')} ${closing.length === 1 ? 'is' : 'are'} shut at rest but open during the run: each side is given the gas it holds at the start (use --gas end for the split the transient leaves)`);
    const fedAtStart = model.feeds.some((f) => f.initially > 0 || f.steps.length > 0);
    if (fedAtStart) notes.push('feeds add gas during the run; the equilibria use the gas held at the start (use --gas end to include what the feeds delivered)');
  }

  if (hasLoopStates(model)) {
    // controllers and regulators couple the groups through their states: the whole state at once
    const { group, rests } = loopEquilibria(model, valves, masses, run);
    const equilibria = rests.map((r) => r.equilibrium);
    let transient: TransientMatch | null = null;
    if (run) {
      const settled = (run.outcomes ?? []).every((o) => o.outcome === 'settled');
      const end = Float64Array.from(model.chambers.map((c) => run!.chambers[c.name].final.mass));
      const total = end.reduce((a, b) => a + b, 0) || 1;
      const dist = equilibria.map((e) => Math.max(...model.chambers.map((c, i) => Math.abs(e.chambers[c.name].mass - end[i]) / total)));
      const nearest = dist.length ? dist.indexOf(Math.min(...dist)) : null;
      const distance = nearest !== null ? dist[nearest] : null;
      const reached = settled && distance !== null && distance <= REACHED ? nearest : null;
      const message = run.status === 'failed' ? `the transient did not complete: ${run.message}`
        : reached !== null ? `the transient settles at equilibrium #${reached + 1}`
          : !settled ? 'the transient has not settled by the end of the simulation' : 'the transient settles at a state not in the list';
      transient = { status: run.status, end: run.end, outcomes: run.outcomes ?? [], reached, nearest, distance, message };
    }
    const failed = equilibria.some((e, k) => !group.equilibria[k].stability.ok);
    return {
      format: 1, title: model.doc.title, file: model.doc.file,
      status: failed ? 'failed' : 'ok',
      message: `${equilibria.length} equilibri${equilibria.length === 1 ? 'um' : 'a'}`,
      valves, gas, heat: model.heat, ambient: model.pa, groups: [group], equilibria, count: equilibria.length, transient, notes,
      complete: group.complete, max_wall: maxWall, timed_out: false,
    };
  }

  // open groups first: their pressures are the known side of one-way valves next to closed groups
  const groups: GroupResult[] = new Array(setup.groups.length);
  const known = new Float64Array(model.chambers.length).fill(Number.NaN);
  setup.groups.forEach((g, gi) => {
    if (g.kind !== 'open') return;
    groups[gi] = groupEquilibria(setup, g, masses, { maxCombinations, deadline });
    const first = groups[gi].equilibria[0];
    const unique = groups[gi].equilibria.every((e) => e.chambers.every((c, i) => c.pressure === first.chambers[i].pressure));
    if (first && unique) g.chambers.forEach((c, i) => { known[c] = first.chambers[i].pressure; });
  });
  const outside = (n: NodeRef): number | null => {
    if (n.kind === 'reservoir') return setup.model.reservoirs[n.index].pressure.at(setup.t);
    return Number.isNaN(known[n.index]) ? null : known[n.index];
  };
  setup.groups.forEach((g, gi) => {
    if (g.kind === 'open') return;
    groups[gi] = groupEquilibria(setup, g, masses, {
      maxCombinations, starts: options.starts, hints: endMasses ? [endMasses] : [], outside, deadline,
    });
  });

  let count = 1;
  for (const g of groups) count *= g.equilibria.length;
  const equilibria: NetworkEquilibrium[] = [];
  if (count > 0) {
    const members = new Array<number>(groups.length).fill(0);
    for (let k = 0; k < Math.min(count, maxListed); k++) {
      equilibria.push(combine(setup, groups, members));
      for (let i = groups.length - 1; i >= 0; i--) {
        if (++members[i] < groups[i].equilibria.length) break;
        members[i] = 0;
      }
    }
  }
  if (count > maxListed) notes.push(`${count} equilibria: only the first ${maxListed} are listed`);

  let transient: TransientMatch | null = null;
  if (run && endMasses) {
    const outcomes = run.outcomes ?? [];
    const settled = outcomes.every((o) => o.outcome === 'settled');
    // per group: the nearest of its equilibria
    const nearestPerGroup = setup.groups.map((g, gi) => {
      let best = -1;
      let dist = Infinity;
      groups[gi].equilibria.forEach((e, k) => {
        const d = distanceTo(g, e, endMasses);
        if (d < dist) { dist = d; best = k; }
      });
      return { best, dist };
    });
    const have = nearestPerGroup.every((x) => x.best >= 0);
    const distance = have ? Math.max(...nearestPerGroup.map((x) => x.dist)) : null;
    let nearest: number | null = null;
    if (have) {
      nearest = equilibria.findIndex((e) => e.members.every((m, gi) => m === nearestPerGroup[gi].best));
      if (nearest < 0) nearest = null;
    }
    const reached = settled && distance !== null && distance <= REACHED && nearest !== null ? nearest : null;
    const near = nearest !== null ? `nearest #${nearest + 1}, ${((distance ?? 0) * 100).toPrecision(2)} % of the group's gas away` : '';
    // closed groups whose gas the transient changed (valves that shut, feeds, one-way valves)
    const moved = setup.groups.filter((g) => g.kind === 'closed').filter((g) => {
      const a = groupMassesOf(g, masses);
      return Math.abs(groupMassesOf(g, endMasses) - a) > 1e-6 * a;
    }).map((g) => g.chambers.map((c) => model.chambers[c].name).join('+'));
    let message: string;
    if (run.status === 'failed') message = `the transient did not complete: ${run.message}`;
    else if (reached !== null) message = `the transient settles at equilibrium #${reached + 1}`;
    else if (!settled) message = `the transient has not settled by the end of the simulation${near ? ` (${near})` : ''}`;
    else message = `the transient settles at a state not in the list${near ? ` (${near})` : ''}`;
    if (moved.length) message += `; it ends with a different amount of gas in ${moved.join(', ')} than analysed (use --gas end)`;
    if (valves !== 'end') message += ` (the transient runs the valve schedules; the equilibria are for valves ${valves})`;
    if (model.heat === 'adiabatic') message += ' (adiabatic transient: its end temperatures differ from ambient)';
    transient = { status: run.status, end: run.end, outcomes, reached, nearest, distance, message };
  }

  const failed = groups.some((g) => g.equilibria.some((e) => !e.stability.ok)) || groups.some((g) => g.kind === 'open' && !g.complete && g.equilibria.length === 0);
  const cylMasses = model.cylinders.map((c) => {
    const end = (side: string): number | undefined => (gas === 'end' && run ? run.chambers[`${c.name}.${side}`]?.final.mass : undefined);
    return { cap: end('cap') ?? c.cap.m0, rod: end('rod') ?? c.rod?.m0 ?? 0 };
  });
  const cylinders = model.cylinders.length ? cylinderRests(model, valves, cylMasses) : undefined;
  const timedOut = groups.some((g) => g.timed_out);
  if (timedOut) notes.push(`the time budget of ${+maxWall.toPrecision(3)} s ran out: the equilibria found so far are listed (raise --max-wall for more)`);
  return {
    format: 1, title: model.doc.title, file: model.doc.file,
    status: failed ? 'failed' : 'ok',
    message: failed ? 'part of the analysis failed numerically (see the group notes)' : `${count} equilibri${count === 1 ? 'um' : 'a'}`,
    valves, gas, heat: model.heat, ambient: model.pa, groups, equilibria, count, transient, notes,
    complete: groups.every((g) => g.complete), max_wall: maxWall, timed_out: timedOut,
    ...(cylinders ? { cylinders } : {}),
  };
}
