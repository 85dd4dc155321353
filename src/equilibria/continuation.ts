/**
 * Branches of equilibria as one parameter changes: pseudo-arclength continuation with fold
 * (limit point), branch point and stability-change detection.
 *
 * The parameter is the gas a closed group holds (`mass:<chamber>`, the group of that chamber),
 * or any number in the netlist addressed by its path (`chambers.cell_a.thickness`,
 * `reservoirs.supply.pressure`, `lines.crossover.diameter`, `chambers.cell_a.start.stretch`),
 * set by the netlist override mechanism (netlist/override.ts) so that values are read and
 * checked as a user's own. The two ends are read that way; in between, the SI values of the
 * netlist that differ between the ends are interpolated linearly (unit conversions are affine;
 * this is checked at the midpoint, and when it fails every value is read from the netlist).
 * When only wall parameters or constant reservoir pressures change, the model in between is the
 * one at --from with those wall laws and pressures replaced; otherwise it is built in full.
 * Closed groups keep the gas they hold in the netlist as written, unless the parameter is that
 * gas or a `start` value, in which case the gas follows the netlist.
 *
 * Equations of one group in scaled unknowns x = (v, ℓ), v_i = ln(m_i/M̄) (M̄ the group's gas, or
 * its total mass for open groups; logarithms so that arclength measures relative changes and a
 * chamber swelling on a falling branch does not swamp the step), ℓ = (λ − from)/(to − from):
 *   closed:  F_0 = (Σ m_i − M(ℓ))/M̄,  F_i = (p_i(m_i) − p_0(m_0))/p_a  (i ≥ 1)
 *   open:    F_i = (p_i(m_i) − p_i*(ℓ))/p_a  (p* the steady-flow pressures)
 * In mass coordinates every state is a single point even past a pressure maximum (the mass
 * fixes the volume), so the branches are smooth curves. ∂F/∂u is analytic (dp/dm from the
 * wall law), ∂F/∂ℓ a forward difference. Pseudo-arclength (Keller): predictor x + h·t, corrector
 * Newton on [F(x); tᵀ(x − x_pred)] = 0 with ∂F/∂ℓ kept from the predicted point (chord), next
 * tangent from [F_x; tᵀ] t' = [0; 1] (orientation preserved). Step size adapts to the Newton
 * iteration count and the turning angle. Detected between accepted points and located by
 * bisection along the arc:
 *   fold         sign change of the tangent's ℓ component;
 *   branch point sign change of det[F_x; tᵀ] without a fold (simple bifurcation);
 *   stability    sign change of the growth rate (stability.ts).
 * Starts: every equilibrium (equilibria.ts) at ℓ = 0, 1 and `interior` values between,
 * traced both ways, skipping those already on a traced branch; so branches not connected to
 * the ends, and ones born in folds between them, are found as long as they exist at one of the
 * start values.
 *
 * References: Keller, in Applications of Bifurcation Theory, Academic Press 1977, 359–384
 * (pseudo-arclength); Allgower & Georg, Introduction to Numerical Continuation Methods, SIAM
 * Classics 2003, ch. 2 (predictor–corrector, tangent orientation), §6.1 (step control) and
 * §8.1 (bifurcation detection by the determinant's sign; chapter numbers from memory).
 */
import type { Model } from '../model/types.js';
import { groupEquilibria } from './group.js';
import { restSetup } from './rest.js';
import { makeParameter } from './trace-parameter.js';
import { GroupProblem } from './trace-problem.js';
import type { TraceBranch, TraceOptions, TraceOutcome } from './trace-types.js';
import type { ValveState } from './types.js';
import { Tracer } from './tracer.js';
import { hasLoopStates } from './closed-loop.js';
import { traceLoop } from './loop-trace.js';
import { DEFAULT_MAX_WALL } from './types.js';

export type { TraceOptions, TraceResult, TraceBranch, TracePoint, TraceOutcome } from './trace-types.js';

/** Whether x lies on a traced branch: the branch's state where it crosses x's parameter value. */
function onBranch(tracer: Tracer, nodes: Float64Array[], x: Float64Array): boolean {
  const n = tracer.n;
  const l = x[n];
  for (let k = 0; k + 1 < nodes.length; k++) {
    const a = nodes[k], b = nodes[k + 1];
    if ((a[n] - l) * (b[n] - l) > 0) continue;
    const w = b[n] === a[n] ? 0 : (l - a[n]) / (b[n] - a[n]);
    const guess = a.map((v, i) => v + w * (b[i] - v));
    const y = tracer.atParameter(guess, l) ?? guess;
    let d = 0;
    for (let i = 0; i < n; i++) d = Math.max(d, Math.abs(y[i] - x[i]));
    if (d < 1e-6) return true;
  }
  return false;
}

/** Follows every branch of equilibria of the groups the parameter touches. */
export function traceEquilibria(model: Model, options: TraceOptions): TraceOutcome {
  const made = makeParameter(model, options);
  if (!made.ok) return made;
  const param = made.value;
  const valves = options.valves ?? 'end';
  const interior = Math.max(0, Math.floor(options.interior ?? 3));
  const maxStep = options.maxStep ?? 0.05;
  const maxPoints = options.maxPoints ?? 1000;
  const maxWall = options.maxWall ?? DEFAULT_MAX_WALL;
  const deadline = performance.now() + maxWall * 1000;
  const notes: string[] = [];
  const budget = { maxWall, timedOut: false };
  if (hasLoopStates(model)) {
    // controllers and regulators: the rest state followed over the parameter, stability watched
    const loopBudget = { deadline, timedOut: false };
    const branches = traceLoop(param, valves, notes, loopBudget);
    budget.timedOut = loopBudget.timedOut;
    notes.push('controllers or regulators: the rest state followed by Newton at sampled values of the parameter, a change of stability located by bisection');
    return traceResult(model, param, valves, branches, notes, budget);
  }
  const base = restSetup(model, valves);
  const baseMasses = Float64Array.from(model.chambers.map((c) => c.m0));
  const branches: TraceBranch[] = [];
  const starts = [0, 1, ...Array.from({ length: interior }, (_, k) => (k + 1) / (interior + 1))];
  let closedTraced = false;

  base.groups.forEach((g, gi) => {
    const names = g.chambers.map((c) => model.chambers[c].name);
    if (param.touches && !names.some((nm) => param.touches!.has(nm))) return;
    if (g.kind === 'fed') { notes.push(`${names.join(', ')}: fed with no outlet, no steady state to follow`); return; }
    if (g.kind === 'closed') closedTraced = true;
    const gas = g.chambers.reduce((a, c) => a + baseMasses[c], 0);
    const scale = param.massOf && g.chambers.includes(param.massOf.chamber)
      ? Math.max(param.massOf.si(0), param.massOf.si(1)) : gas;
    const prob = new GroupProblem(param, gi, valves, baseMasses, scale, names);
    const tracer = new Tracer(prob, maxStep, maxPoints, deadline);
    const traced: Float64Array[][] = [];
    for (const l of starts) {
      if (performance.now() > deadline) { budget.timedOut = true; break; }
      const c = prob.context(l);
      if (typeof c === 'string') { notes.push(`at ${param.vary} = ${+param.value(l).toPrecision(6)} ${param.unit}: ${c.split('\n')[0]}`); continue; }
      const eq = groupEquilibria(c.setup, c.group, c.masses, { maxCombinations: 4096, stability: false, deadline });
      if (eq.timed_out) budget.timedOut = true;
      for (const e of eq.equilibria) {
        const x = new Float64Array(names.length + 1);
        e.chambers.forEach((ch, i) => { x[i] = Math.log(ch.mass / scale); });
        x[names.length] = l;
        if (performance.now() > deadline) { budget.timedOut = true; break; }
        if (traced.some((nodes) => onBranch(tracer, nodes, x))) continue;
        const fwd = tracer.run(x, 1);
        const bwd = tracer.run(x, -1);
        if (tracer.timedOut) budget.timedOut = true;
        const points = [...bwd.points.slice(1).reverse(), ...fwd.points];
        const nodes = [...bwd.nodes.slice(1).reverse(), ...fwd.nodes];
        if (points.length === 0) continue;
        traced.push(nodes);
        branches.push({ id: branches.length + 1, chambers: names, points, ends: [bwd.why, fwd.why] });
      }
    }
  });
  if (closedTraced && param.gasFollows && !param.massOf) notes.push('the parameter is a start value: the gas each closed group holds follows it');
  else if (closedTraced && !param.massOf) notes.push('each closed group keeps the gas it holds in the netlist as written');
  if (branches.length === 0) notes.push(budget.timedOut ? 'no branch traced within the time budget' : 'no equilibrium found at any start value');
  return traceResult(model, param, valves, branches, notes, budget);
}

/** The result of a trace. */
function traceResult(model: Model, param: { vary: string; from: number; to: number; unit: string }, valves: ValveState, branches: TraceBranch[], notes: string[], budget: { maxWall: number; timedOut: boolean }): TraceOutcome {
  return {
    ok: true,
    value: {
      format: 1, title: model.doc.title, file: model.doc.file,
      status: 'ok', message: `${branches.length} branch${branches.length === 1 ? '' : 'es'}`,
      parameter: { vary: param.vary, from: param.from, to: param.to, unit: param.unit },
      valves, branches, notes, max_wall: budget.maxWall, timed_out: budget.timedOut,
    },
  };
}
