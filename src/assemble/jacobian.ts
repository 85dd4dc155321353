/**
 * The jacobian ∂f/∂y of a network's right-hand side, assembled element by element into a
 * sparsity pattern reserved once at assembly, in O(chambers + branches) work whatever the
 * topology (a star around a tank costs no more than a chain).
 *
 * Structure of the rhs (assemble/system.ts). Chamber i has states y_i = (m [, T] [, h]); its
 * pressure p_i(y_i) comes from its wall law; branch b joins nodes a → c and carries
 * q_b(p_a, p_c, T_a, T_c, t). The rates are
 *   ṁ_i = Σ_b s_ib·q_b + feeds                                  (s = −1 at `from`, +1 at `to`)
 *   Ṫ_i = Φ_T(y_i; ṁ_i, ṁin_i, ṁout_i, Hin_i),   ḣ_i = Φ_h(h_i; ṁ_i),
 * where the aggregates ṁin, ṁout, Hin = Σ ṁ·T_up sum the branch flows by direction. Hence
 *   ∂f/∂y = ∂Φ/∂y|_aggregates  (chamber-local)  +  Σ_b (∂Φ/∂aggregates)(∂aggregates/∂q_b)(∂q_b/∂y),
 * and ∂q_b/∂y involves only the states of the branch's two ends, through
 *   ∂q/∂m = (∂q/∂p)·(∂p/∂m), ∂q/∂T = (∂q/∂p)·(∂p/∂T) + ∂q/∂T|_p, ∂q/∂h = (∂q/∂p)·(∂p/∂h).
 * Pressure partials are analytic (ChamberState.pressurePartials, from p(V)(V + Vd) = m·R·T);
 * the flow partials ∂q/∂p, ∂q/∂T are one-sided differences of the scalar flow law of that one
 * branch (BranchState.partials): cheap, local and generic over tubes, valves and valves in
 * lines. The chamber-local part of Φ_T (which involves the wall's curvature through κ) is a
 * difference quotient of that chamber alone, re-solved at a perturbed state.
 *
 * Assembly on the element contract (elements/contract.ts): each element reserves its entries
 * (`reserveJacobian`, run twice: collect, then place), and at every jacobian the passes run in
 * element order after one rhs at the same point: `prepareJacobian` (a node's pressure partials
 * and row weights into the node table), `loadJacobian` (a branch's transfer through
 * `Nodes.transferJacobian`, the chain rule above), `settleJacobian` (a chamber's own energy
 * entries, which need the whole inflow).
 *
 * Why not coloured differences of the whole rhs: a tank joined to every other chamber makes a
 * dense row, and a column colouring then needs one rhs evaluation per chamber (O(n²) work per
 * jacobian); the element-wise assembly stays O(n) and costs less than one rhs evaluation.
 *
 * References: Hairer & Wanner, Solving ODEs II, 2nd ed. 1996, §IV.7–8 (Rosenbrock methods need
 * the jacobian at every step; exploit its structure); Curtis, Powell & Reid, J. Inst. Maths
 * Applics 13 (1974) 117 (the colouring alternative and its limits).
 */
import type { Element, JacobianReserve } from '../elements/contract.js';
import type { Nodes } from '../elements/nodes.js';
import { patternFromEntries, patternIndex, type SparsePattern } from '../linalg/sparse-pattern.js';

/** What the jacobian reads of the system (assemble/system.ts implements it). */
export interface JacobianHost {
  readonly n: number;
  readonly elements: Element[];
  readonly nodes: Nodes;
  rhs(t: number, y: Float64Array, dydt: Float64Array): void;
}

export class NetworkJacobian {
  readonly pattern: SparsePattern;
  private readonly preparers: Element[];
  private readonly loaders: Element[];
  private readonly settlers: Element[];
  private readonly f: Float64Array;

  constructor(private readonly sys: JacobianHost) {
    const { elements, nodes, n } = sys;
    // pass 1: collect the entries (plain growable lists: this runs once, for up to ~10⁵ entries)
    const ri: number[] = [];
    const ci: number[] = [];
    const collect = (row: number, col: number): number => { ri.push(row); ci.push(col); return -1; };
    const collecting: JacobianReserve = { entry: collect, link: (a, c) => nodes.link(a, c, collect, false) };
    for (const e of elements) e.reserveJacobian?.(collecting);
    const pattern = (this.pattern = patternFromEntries(n, ri, ci));
    // pass 2: place them
    const place = (row: number, col: number): number => patternIndex(pattern, row, col);
    const placing: JacobianReserve = { entry: place, link: (a, c) => nodes.link(a, c, place, true) };
    for (const e of elements) e.reserveJacobian?.(placing);
    this.preparers = elements.filter((e) => e.prepareJacobian);
    this.loaders = elements.filter((e) => e.loadJacobian);
    this.settlers = elements.filter((e) => e.settleJacobian);
    this.f = new Float64Array(n);
  }

  /** Writes ∂f/∂y at (t, y) into values (pattern order). */
  compute(t: number, y: Float64Array, values: Float64Array): void {
    const f = this.f;
    // The rhs at (t, y) leaves the node states, flows and inflow aggregates in the elements.
    this.sys.rhs(t, y, f);
    values.fill(0);
    const pr = this.preparers, ld = this.loaders, st = this.settlers;
    for (let k = 0; k < pr.length; k++) pr[k].prepareJacobian!(y, f, values);
    for (let k = 0; k < ld.length; k++) ld[k].loadJacobian!(t, values);
    for (let k = 0; k < st.length; k++) st[k].settleJacobian!(y, f, values);
  }
}
