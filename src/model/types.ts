/**
 * Model: a netlist turned into frozen SI numbers and ready-made physics objects. Nothing here
 * knows about state vectors; `assemble/` does.
 */
import type { Gas } from '../physics/gas.js';
import type { WallLaw } from '../physics/wall.js';
import type { CylinderModel } from './cylinder.js';
import type {
  ChamberSpec, ControllerSpec, ExpectSpec, ProbeQuantity, NetlistDoc, ScheduleStep, SimulateSpec, TimeSeries, ValveOperation, ValveRating,
} from '../netlist/types.js';

export type HeatMode = NetlistDoc['heat'];

/**
 * A node is a chamber (holds gas), a reservoir (fixed pressure, a boundary), or one side of a
 * cylinder (holds gas; `index` is the cylinder's).
 */
export type NodeRef = { kind: 'chamber'; index: number } | { kind: 'reservoir'; index: number } | { kind: 'port'; index: number; side: 'cap' | 'rod' };

export interface ChamberModel {
  name: string;
  wall: WallLaw;
  /** Deflation branch of a measured wall with hysteresis; `wall` is then the inflation branch. */
  deflation?: WallLaw;
  /** Rigid gas volume lumped into this node (half of each attached line), m³. */
  deadVolume: number;
  /** Start: wall volume (m³), temperature (K), gas mass in the node incl. dead volume (kg). */
  V0: number;
  T0: number;
  m0: number;
  /** h·A (W/K) for heat: exchange; 0 otherwise. */
  heatTransfer: number;
  limits: { pressure?: number; stretch?: number };
  spec: ChamberSpec;
}

export interface ReservoirModel {
  name: string;
  pressure: TimeSeries;
  T: number;
}

export interface LineGeometry {
  diameter: number;
  length: number;
  roughness: number;
  /** A wave line (elements/wave-line.ts): its segment count, and whether the netlist gave it. */
  wave?: { segments: number; given: boolean };
}

export interface BranchModel {
  name: string;
  kind: 'line' | 'valve';
  from: NodeRef;
  to: NodeRef;
  /** Present for a line, and for a valve that sits inside a line. */
  line?: LineGeometry;
  /** Name of the line hosting this valve (the line itself is then not a separate branch). */
  hostLine?: string;
  valve?: { rating: ValveRating; operation: ValveOperation };
  /**
   * The vent of a relieving regulator (named `<regulator>.vent`): from the regulator's
   * downstream node to ambient, through the regulator's own rating, opening as
   * physics/regulator.ts says. `of` is the regulator's branch index.
   */
  vent?: { of: number; set: number /* Pa gauge */; band: number /* Pa */ };
}

export interface FeedModel {
  name: string;
  into: number;          // chamber index, or −1 for a cylinder's side (then `port`)
  port?: { index: number; side: 'cap' | 'rod' };
  rate: number;          // kg/s at full opening
  T: number;             // K
  initially: number;
  steps: ScheduleStep[];
  /** Delivery curve: pressures (Pa absolute, increasing, the last the shut-off) and flows (kg/s, the last 0). */
  curve?: { p: Float64Array; q: Float64Array };
}

/** What a controller measures: a chamber's or a branch's quantity. */
export type MeasureRef =
  | { kind: 'chamber'; index: number; quantity: ProbeQuantity }
  | { kind: 'branch'; index: number; quantity: ProbeQuantity };

export interface ControllerModel {
  name: string;
  spec: ControllerSpec;
  measure: MeasureRef;
  /** Branch index of the driven valve. */
  valve: number;
}

/**
 * An element of a kind read from its table alone (netlist/kinds.ts: ELEMENT_TABLES): its values
 * as read (SI), its `name` parameters resolved to nodes, and whether it is a boundary (it
 * exchanges gas with the surroundings, so a group of chambers it touches is open).
 */
export interface ElementModel {
  kind: string;
  name: string;
  values: Record<string, unknown>;
  nodes: Record<string, NodeRef>;
  boundary: boolean;
}

export interface Model {
  doc: NetlistDoc;
  gas: Gas;
  pa: number;            // ambient pressure, Pa absolute
  Ta: number;            // ambient temperature, K
  heat: HeatMode;
  chambers: ChamberModel[];
  reservoirs: ReservoirModel[];
  branches: BranchModel[];
  feeds: FeedModel[];
  cylinders: CylinderModel[];
  controllers: ControllerModel[];
  /** Elements of kinds read from their table alone (absent when there are none). */
  elements?: ElementModel[];
  simulate: SimulateSpec;
  expect: ExpectSpec[];
}
