/**
 * The command line: parses arguments, calls the library, prints, picks the exit code.
 * Each command is loaded on demand so that `--help` starts fast.
 * Exit codes: 0 success · 1 an expectation failed · 2 invalid netlist or usage · 3 the
 * simulation could not be completed.
 */
import { Command, CommanderError } from 'commander';
import { printableOutput } from '../diag/text.js';
import { quietOnClosedPipe, UsageError } from './io.js';

quietOnClosedPipe();

// Nothing from a netlist reaches the terminal raw: the strings plenum composes escape the
// input they quote (src/diag/text.ts); as a last line of defence every string written to the
// terminal has its control characters escaped too (line breaks, tabs and the progress
// display's leading carriage return excepted).
for (const stream of [process.stdout, process.stderr]) {
  const write = stream.write.bind(stream) as (chunk: unknown, ...rest: unknown[]) => boolean;
  stream.write = ((chunk: unknown, ...rest: unknown[]) => write(typeof chunk === 'string' ? printableOutput(chunk) : chunk, ...rest)) as typeof stream.write;
}

const VERSION = '0.1.0';

function fail(e: unknown): never {
  if (e instanceof UsageError) {
    process.stderr.write(`plenum: ${e.message}\n`);
    process.exit(e.exitCode);
  }
  process.stderr.write(`plenum: internal error: ${e instanceof Error ? e.stack ?? e.message : String(e)}\nThis is a bug in plenum; please report it with the netlist.\n`);
  process.exit(70);
}

const program = new Command();
program
  .name('plenum')
  .description('Simulate networks of compliant gas chambers, tubing and valves from a YAML netlist.')
  .version(VERSION)
  .showHelpAfterError('(run with --help for usage)')
  .exitOverride()
  .addHelpText('after', `
Exit codes: 0 success, 1 an expectation failed, 2 invalid netlist or usage,
3 the simulation could not be completed (results up to the failure are still written).

Examples:
  plenum run networks/cushion-runaway.yaml
  plenum run rig.yaml --csv rig.csv --json rig.json
  plenum check networks/*.yaml --junit report.xml
  plenum run rig.yaml --baseline rig.base.json && plenum diff rig.base.json new.base.json
  plenum equilibria networks/cushion-runaway.yaml
  plenum trace networks/cushion-runaway.yaml --vary mass:cell_a --from "1 g" --to "4 g" --csv branches.csv
  plenum sweep rig.yaml --vary 'chambers.cell_a.thickness=1.5 mm±3%' --samples 200 --json study.json
  plenum fit bench.csv --wall gent --radius 40mm --thickness 1.5mm
  plenum calibrate rig.yaml --data bench.csv --free 'valves.v1.conductance=0.1 L/(s*bar)..2 L/(s*bar)'
  plenum size rig.yaml --free 'valves.v1.orifice=0.5 mm..4 mm' --margin 0.1
  plenum schema > plenum.schema.json
  plenum kinds`);

program.command('run')
  .description('simulate a netlist and print a summary; optionally write CSV and JSON')
  .argument('<netlist>', 'netlist file (.yaml); - reads it from standard input')
  .option('--csv <file>', 'write the sampled time history as CSV (- for stdout)')
  .option('--json <file>', 'write the result summary as JSON (- for stdout)')
  .option('-q, --quiet', 'do not print the summary table')
  .option('--baseline <file>', 'write a compact trace and summary for `plenum diff` (regression baselines; - for stdout)')
  .option('--plots <dir>', 'write the figures (network, pressure–volume, time histories) as SVG files into this directory')
  .action(async (file: string, opts: { csv?: string; json?: string; quiet?: boolean; baseline?: string; plots?: string }) => {
    const { runCommand } = await import('./run.js');
    process.exitCode = await runCommand(file, opts);
  });

program.command('check')
  .description('simulate netlists in parallel and judge their expectations (for CI): one line per expectation, a tally, exit 0/1/2/3')
  .argument('<netlists...>', 'netlist files (.yaml), directories of them, or quoted glob patterns (\'networks/*.yaml\')')
  .option('--junit <file>', 'write a JUnit XML report (one testsuite per netlist, one testcase per expectation; - for stdout)')
  .option('--annotations', 'also print CI log annotations (`::error file=…,line=…::message`) for failures and warnings')
  .option('--jobs <n>', 'threads to use (default: the available cores; 1: the main thread only)')
  .option('-q, --quiet', 'print only failures, errors and the tally')
  .action(async (files: string[], opts: { junit?: string; annotations?: boolean; jobs?: string; quiet?: boolean }) => {
    const { checkCommand } = await import('./check.js');
    process.exitCode = await checkCommand(files, opts);
  });

program.command('diff')
  .description('compare two traces (baselines from `run --baseline`, or CSV from `run --csv`): largest deviations, exit 1 outside tolerance')
  .argument('<a>', 'the reference: a baseline (.json), a CSV trace, or a bench recording (measured CSV)')
  .argument('<b>', 'the trace to compare with it (a recording is compared at its reading times, on its channels)')
  .option('--rtol <r>', 'relative tolerance (default 1e-6)')
  .option('--atol <a>', 'absolute tolerance for every quantity, SI (default: per quantity, see docs/ci.md)')
  .option('--tol <quantity=value>', 'tolerance for a quantity (pressure, volume, mass, temperature, flow, stretch, reynolds, time) or one channel: `pressure=50 Pa`, `cell_a.gauge=0.1%` (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--top <n>', 'how many of the largest deviations to print (default 10)')
  .action(async (a: string, b: string, opts: { rtol?: string; atol?: string; tol: string[]; top?: string }) => {
    const { diffCommand } = await import('./diff.js');
    process.exitCode = diffCommand(a, b, opts);
  });

program.command('sweep')
  .description('run a parameter study (grid or Monte Carlo) in parallel and summarise the outcomes')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('--vary <path=values>', 'a parameter by its netlist path and its values: a list `1.2 mm,1.5 mm`, a range `1 mm:2 mm:5`, `normal(M, SD)`, `uniform(A, B)` or `NOMINAL±TOL` (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--samples <n>', 'random draws (per grid point) for Monte Carlo')
  .option('--seed <s>', 'seed of the random draws (default 1)')
  .option('--jobs <n>', 'worker threads (default: the available cores)')
  .option('--shard <K/N>', 'run only cases k with k mod N = K-1; join the shards with `plenum merge`')
  .option('--csv <file>', 'write one row per case as CSV (- for stdout)')
  .option('--json <file>', 'write the study (cases and summary) as JSON (- for stdout)')
  .option('-q, --quiet', 'do not print the summary')
  .action(async (file: string, opts: { vary: string[]; samples?: string; seed?: string; jobs?: string; shard?: string; csv?: string; json?: string; quiet?: boolean }) => {
    const { sweepCommand } = await import('./sweep.js');
    process.exitCode = await sweepCommand(file, opts);
  });

program.command('merge')
  .description('join the shards of a study (written by `plenum sweep --shard K/N --json`) into the whole study')
  .argument('<shards...>', 'shard JSON files')
  .option('--json <file>', 'write the merged study as JSON (- for stdout)')
  .option('--csv <file>', 'write the merged cases as CSV (- for stdout)')
  .option('-q, --quiet', 'do not print the summary')
  .action(async (files: string[], opts: { json?: string; csv?: string; quiet?: boolean }) => {
    const { mergeCommand } = await import('./merge.js');
    process.exitCode = mergeCommand(files, opts);
  });

program.command('fit')
  .description('fit a wall law to measured inflation data (pressure against volume or stretch)')
  .argument('<data>', 'CSV file whose header names quantity and unit, e.g. `volume [mL],gauge [kPa]`')
  .requiredOption('--wall <law>', 'neo-hookean, mooney-rivlin or gent')
  .requiredOption('--radius <r>', 'unstretched radius of the sample, e.g. `40 mm`')
  .requiredOption('--thickness <t>', 'unstretched wall thickness, e.g. `1.5 mm`')
  .option('--ambient <p>', 'ambient pressure, for absolute pressure data (default 101.325 kPa)')
  .option('--json <file>', 'write parameters, errors and residuals as JSON (- for stdout)')
  .option('--csv <file>', 'write the residual table as CSV (- for stdout)')
  .option('-q, --quiet', 'do not print the report')
  .action(async (file: string, opts: { wall: string; radius: string; thickness: string; ambient?: string; json?: string; csv?: string; quiet?: boolean }) => {
    const { fitCommand } = await import('./fit.js');
    process.exitCode = fitCommand(file, opts);
  });

program.command('calibrate')
  .description('fit netlist parameters to bench recordings (time series): values, standard errors, 95 % intervals, fit per probe')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('--data <file>', 'a recording: CSV with `time [s]` and `<probe> [unit]` columns; `FILE;PATH=VALUE;...` gives its own conditions (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--free <path>', 'a parameter to fit, by its netlist path, with optional bounds: `valves.v1.conductance=0.1 L/(s*bar)..2 L/(s*bar)` (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--sigma <probe=value>', 'measurement scale of a probe, e.g. `finger.gauge=0.5 kPa` (default: estimated from the residuals)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--json <file>', 'write parameters, intervals, correlation and fit per probe as JSON (- for stdout)')
  .option('--residuals <file>', 'write one row per reading (measured, simulated, residual) as CSV (- for stdout)')
  .option('--write-netlist <file>', 'write the netlist with the calibrated values (comments kept)')
  .option('--jobs <n>', 'worker threads (default: the available cores)')
  .option('--max-iterations <n>', 'Levenberg–Marquardt iterations (default 100)')
  .option('-q, --quiet', 'do not print the report')
  .action(async (file: string, opts: { data: string[]; free: string[]; sigma: string[]; json?: string; residuals?: string; writeNetlist?: string; jobs?: string; maxIterations?: string; quiet?: boolean }) => {
    const { calibrateCommand } = await import('./calibrate.js');
    process.exitCode = await calibrateCommand(file, opts);
  });

program.command('size')
  .description('find parameter values for which every expectation passes with a margin: a feasible boundary, or an optimum of several')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('--free <path=lo..hi>', 'a parameter to size, by its netlist path, with its range: `valves.v1.orifice=0.5 mm..4 mm` (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--minimise <path>', 'the free parameter to make as small as possible (default with one free parameter)')
  .option('--maximise <path>', 'the free parameter to make as large as possible')
  .option('--margin <x>', 'fraction by which every expectation must clear its limit (default 0), e.g. 0.1 or 10%')
  .option('--robust <path±tol>', "the design must pass for the worst case over this tolerance: `lines.feed.diameter±0.1 mm`, `valves.v1.conductance±10%` (repeatable)", (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('--samples <n>', 'a seeded Monte Carlo sample of the tolerances instead of their corners')
  .option('--seed <s>', 'seed of the Monte Carlo sample (default 1)')
  .option('--jobs <n>', 'worker threads (default: the available cores)')
  .option('--json <file>', 'write the result as JSON (- for stdout)')
  .option('--write-netlist <file>', 'write the netlist with the sized values (comments kept)')
  .option('-q, --quiet', 'do not print the report')
  .action(async (file: string, opts: { free: string[]; minimise?: string; maximise?: string; margin?: string; robust: string[]; samples?: string; seed?: string; jobs?: string; json?: string; writeNetlist?: string; quiet?: boolean }) => {
    const { sizeCommand } = await import('./size.js');
    process.exitCode = await sizeCommand(file, opts);
  });

program.command('report')
  .description('simulate a netlist and write a self-contained HTML report (network, figures, tables, events, checks)')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('-o, --out <file>', 'the HTML file to write (- for stdout)')
  .option('--plots <dir>', 'also write the figures as SVG files into this directory')
  .option('--data <file>', 'a bench recording (CSV with `time [s]` and `<probe> [unit]` columns) to overlay, with a residual panel (repeatable)', (v: string, acc: string[]) => [...acc, v], [] as string[])
  .option('-q, --quiet', 'do not print the summary table')
  .action(async (file: string, opts: { out?: string; plots?: string; data: string[]; quiet?: boolean }) => {
    const { reportCommand } = await import('./report.js');
    process.exitCode = await reportCommand(file, { ...opts, version: VERSION });
  });

program.command('equilibria')
  .description('find every equilibrium of the network for the gas it holds, its stability, and which one the transient reaches')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('--valves <state>', 'valves with a schedule: open, closed, or end (as at the end of their schedules)', 'end')
  .option('--gas <source>', 'gas in each group: as held at the start, or at the end of the transient (default: end when a group exchanges gas with a reservoir or feed during the run, else start)')
  .option('--json <file>', 'write the equilibria as JSON (- for stdout)')
  .option('--no-transient', 'do not simulate to see which equilibrium the transient reaches')
  .option('--max-combinations <n>', 'branch combinations per group searched exhaustively before deflated Newton takes over (default 4096)')
  .option('--max-wall <time>', 'wall-clock budget, e.g. "2 min" (default 30 s): the transient may use half; then the equilibria found so far are listed, marked incomplete')
  .option('-q, --quiet', 'do not print the table')
  .action(async (file: string, opts: { valves?: string; gas?: string; json?: string; transient?: boolean; maxCombinations?: string; maxWall?: string; quiet?: boolean }) => {
    const { equilibriaCommand } = await import('./equilibria.js');
    process.exitCode = equilibriaCommand(file, opts);
  });

program.command('trace')
  .description('follow branches of equilibria as one parameter changes (pseudo-arclength continuation), with folds and stability changes')
  .argument('<netlist>', 'netlist file (.yaml)')
  .requiredOption('--vary <param>', 'a netlist path (chambers.cell_a.thickness, reservoirs.supply.pressure, lines.link.diameter) or mass:<chamber> (the gas of its group)')
  .requiredOption('--from <value>', 'start value, written as in a netlist (e.g. "1.2 mm", "20 kPa gauge", "2 g")')
  .requiredOption('--to <value>', 'end value, in the same unit')
  .option('--valves <state>', 'valves with a schedule: open, closed, or end', 'end')
  .option('--csv <file>', 'write the branch points as CSV (- for stdout)')
  .option('--json <file>', 'write the branches as JSON (- for stdout)')
  .option('--step <h>', 'largest step along a branch in scaled arclength: the parameter range counts 1, each chamber\'s gas by its logarithm (default 0.05)')
  .option('--starts <n>', 'extra start values between --from and --to (default 3)')
  .option('--max-wall <time>', 'wall-clock budget, e.g. "2 min" (default 30 s): then the branches traced so far are written, marked incomplete')
  .option('-q, --quiet', 'do not print the summary')
  .action(async (file: string, opts: { vary?: string; from?: string; to?: string; valves?: string; csv?: string; json?: string; step?: string; starts?: string; maxWall?: string; quiet?: boolean }) => {
    const { traceCommand } = await import('./trace.js');
    process.exitCode = traceCommand(file, opts);
  });

program.command('schema')
  .description('print the JSON Schema of the netlist format (for editor completion and checking)')
  .action(async () => {
    const { netlistJsonSchema } = await import('../netlist/schema.js');
    process.stdout.write(JSON.stringify(netlistJsonSchema(), null, 2) + '\n');
  });

program.command('kinds')
  .description('list element kinds and wall laws with their parameters')
  .option('--markdown', 'print as a Markdown table (as in the README)')
  .action(async (opts: { markdown?: boolean }) => {
    const { kindsText } = await import('./kinds.js');
    process.stdout.write(kindsText(Boolean(opts.markdown)));
  });

// no command at all is a usage error (exit 2), with the help on standard error
if (process.argv.length <= 2) {
  process.stderr.write(program.helpInformation());
  process.stderr.write('plenum: no command given (run, check, report, ...); see above\n');
  process.exit(2);
}

try {
  await program.parseAsync(process.argv);
} catch (e) {
  if (e instanceof CommanderError) {
    if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') process.exit(0);
    process.exit(2);
  }
  fail(e);
}
