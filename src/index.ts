/**
 * plenum as a library: read a netlist, build a model, simulate, and render results.
 *
 *   import { loadModel, simulate, resultJson, formatDiagnostic } from 'plenum';
 *   const m = loadModel(text, 'rig.yaml');
 *   if (!m.ok) console.error(m.diagnostics.map(formatDiagnostic).join('\n'));
 *   else console.log(resultJson(simulate(m.value)));
 */

export type { Diagnostic, Result } from './diag/diagnostic.js';
export { formatDiagnostic } from './diag/diagnostic.js';
export type { NetlistDoc } from './netlist/types.js';
export type { Model } from './model/types.js';
export type { RunResult, Trace, ExpectationResult, ChamberSummary, LineSummary, ValveSummary, RunStats } from './transient/results.js';
export type { RunFault } from './transient/results.js';
/** Reads and builds in one go; diagnostics from both stages, warnings kept. */
export { loadModel } from './transient/load.js';
export { readNetlist } from './netlist/read.js';
export { netlistJsonSchema } from './netlist/schema.js';
export { buildModel } from './model/build.js';
export { simulate, type SimulateOptions, type StiffIntegrator } from './transient/transient.js';
export { resultJson } from './report/json.js';
export { traceCsv } from './report/csv.js';
export { summaryText } from './report/table.js';
export { junitXml, type NetlistCheck } from './report/junit.js';
export { baselineJson, readTrace, type TraceFile } from './report/baseline.js';
export { diffTraces, type DiffOptions, type DiffResult } from './transient/trace-diff.js';
export { runSweep, prepareSweep, shardIndices, type SweepOptions, type SweepResult, type Study, type Shard } from './studies/sweep.js';
export { sweepJson, sweepCsv, sweepSummaryText, summariseCases, parseSweepJson, mergeSweeps, type SweepSummary } from './studies/sweep-report.js';
export type { CaseResult } from './studies/sweep-case.js';
export { wilson, summarise } from './studies/sweep-stats.js';
export { applyOverrides, checkPath, readWithOverrides, type Override } from './netlist/override.js';
export { fitWall, fitJson, fitText, fitResidualCsv, chamberSnippet, measuredSnippet, splitSegments, FIT_LAWS, type FitLaw, type FitReport, type SegmentFit, type FittedParameter } from './studies/fit.js';
export { readBenchCsv, type BenchData, type BenchRow } from './studies/fit-data.js';
export { levenbergMarquardt, type LmProblem, type LmResult } from './studies/fit-lm.js';
export { studentQuantile, studentCdf } from './studies/fit-stats.js';
export { calibrate, type CalibrateOptions, type CalibrationReport, type CalibratedParameter, type CalibrationInput, type ChannelFit, type ResidualRow } from './studies/calibrate.js';
export { calibrationText, calibrationJson, residualCsv, calibratedNetlist, netlistWithValues } from './studies/calibrate-report.js';
export { size, type SizeOptions, type SizeReport } from './studies/size.js';
export { sizeText, sizeJson } from './studies/size-report.js';
export { expectationMargin } from './studies/margins.js';
export { readMeasuredCsv, checkSeries, type MeasuredSeries } from './studies/bench-series.js';
export { measuredOverlays, measuredTrace, alignToMeasured } from './studies/measured-overlay.js';
export type { MeasuredOverlay } from './transient/report-input.js';
export { reportInput, type ReportInput, type ReportInputOptions, type EquilibriumMark, type WallCurve, type ReportTopology } from './transient/report-input.js';
export { reportHtml } from './report/html.js';
export { reportFigures, type Figure, type FigureOptions } from './report/plots.js';
export {
  findEquilibria, openDuringRun, restSetup, groupEquilibria, groupStability,
  type EquilibriaOptions, type EquilibriaResult, type NetworkEquilibrium, type GroupResult, type GroupEquilibrium,
  type ChamberRest, type TransientMatch, type ValveState, type GasSource,
} from './equilibria/equilibria.js';
export { traceEquilibria, type TraceOptions, type TraceResult, type TraceBranch, type TracePoint } from './equilibria/continuation.js';
export { classifyOutcomes } from './transient/outcome.js';
export type { GroupOutcome } from './transient/results.js';
export { stabilityAt, type Stability, type Linearisation } from './equilibria/stability.js';
export { eigenvalues } from './linalg/eigen.js';
export { equilibriaText, equilibriaJson, traceText, traceJson, traceBranchesCsv } from './report/equilibria.js';

export { traceMemory, traceMemoryDiagnostic } from './transient/trace-memory.js';
