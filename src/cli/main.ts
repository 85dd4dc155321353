/**
 * The command line: parses arguments, calls the library, prints, picks the exit code.
 * Each command is loaded on demand so that `--help` starts fast.
 * Exit codes: 0 success · 1 an expectation failed · 2 invalid netlist or usage · 3 the
 * simulation could not be completed.
 */
import { Command, CommanderError } from 'commander';
import { UsageError } from './io.js';

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
  plenum schema > plenum.schema.json
  plenum kinds`);

program.command('run')
  .description('simulate a netlist and print a summary; optionally write CSV and JSON')
  .argument('<netlist>', 'netlist file (.yaml)')
  .option('--csv <file>', 'write the sampled time history as CSV (- for stdout)')
  .option('--json <file>', 'write the result summary as JSON (- for stdout)')
  .option('-q, --quiet', 'do not print the summary table')
  .action(async (file: string, opts: { csv?: string; json?: string; quiet?: boolean }) => {
    const { runCommand } = await import('./run.js');
    process.exitCode = runCommand(file, opts);
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

try {
  await program.parseAsync(process.argv);
} catch (e) {
  if (e instanceof CommanderError) {
    if (e.code === 'commander.helpDisplayed' || e.code === 'commander.version' || e.code === 'commander.help') process.exit(0);
    process.exit(2);
  }
  fail(e);
}
