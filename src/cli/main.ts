#!/usr/bin/env node
/**
 * The termdrift command line: parses flags, calls the library, sets the exit code.
 * Every TermdriftError becomes a message on stderr and exit code 2; anything else is a bug
 * and is reported as one, still without a raw stack trace unless TERMDRIFT_DEBUG is set.
 */
import { Command, CommanderError } from 'commander';
import { TermdriftError } from '../errors.js';
import { EXIT } from './exitCode.js';
import { runValidate } from './validate.js';
import { runCheckCommand, runDemoCommand, runDiffCommand, type Io } from './reportCommands.js';
import { runImport } from './importCommand.js';
import { FAIL_LEVELS } from '../rank/failOn.js';
import { VERSION } from '../version.js';

const out = (s: string) => process.stdout.write(s.endsWith('\n') ? s : s + '\n');

function action<A extends unknown[]>(fn: (...args: A) => Promise<number>) {
  return async (...args: A) => {
    process.exitCode = await fn(...args);
  };
}

export function buildProgram(): Command {
  const program = new Command();
  program
    .name('termdrift')
    .description('Compare two releases of a terminology, find structural changes, re-score local mappings and report by impact.')
    .version(VERSION)
    .showHelpAfterError('(run with --help for the usage)')
    .exitOverride();

  program
    .command('validate')
    .description('check one input file and list every problem with file, line and column')
    .argument('<file>', 'the table to check (CSV or TSV, optionally .gz)')
    .requiredOption('--kind <kind>', 'release | mapping | hierarchy | history')
    .option('--columns <list>', 'header names of our columns, e.g. concept_id=CODE,term=STR')
    .option('--format <format>', 'text | json', 'text')
    .action(action((file: string, opts) => runValidate(file, opts, out)));

  const io: Io = { out, isTTY: Boolean(process.stdout.isTTY) };
  const releaseOptions = (cmd: Command) =>
    cmd
      .option('--old-hierarchy <file>', 'concept_id,parent_id table of the old release')
      .option('--new-hierarchy <file>', 'concept_id,parent_id table of the new release')
      .option('--history <file>', 'old_id,new_id,relation table published with the new release')
      .option('--columns <list>', 'header names of our release columns, e.g. concept_id=CODE,term=STR')
      .option('--old-label <label>', 'name of the old release in reports (default: its file name)')
      .option('--new-label <label>', 'name of the new release in reports (default: its file name)')
      .option('--out <file>', 'write the report to a file instead of standard output')
      .option('--now <time>', 'time to write into the report (reports carry no clock time otherwise)')
      .option('--limit <n>', 'text report: show at most N rows per list')
      .option('--verdict <list>', 'text report: show only these verdicts (comma-separated)')
      .option('--no-color', 'no colour in the terminal report (also when NO_COLOR is set)');

  releaseOptions(
    program
      .command('diff')
      .description('find the structural changes between two releases of a concept-to-term table')
      .argument('<old>', 'old release table')
      .argument('<new>', 'new release table')
      .option('--format <format>', 'text | json | md', 'text'),
  ).action(action((o: string, n: string, opts) => runDiffCommand(o, n, opts, io)));

  releaseOptions(
    program
      .command('check')
      .description('diff two releases, re-score every mapping against the new one, and report by impact')
      .argument('<old>', 'old release table')
      .argument('<new>', 'new release table')
      .requiredOption('--mappings <file>', 'the mapping set: CSV/TSV (local_code,local_label,target_id,…), SSSOM TSV, or FHIR ConceptMap JSON')
      .option('--format <format>', 'text | json | md | csv | html', 'text')
      .option('--fail-on <level>', `exit 1 when a mapping has this verdict or a more severe one: ${FAIL_LEVELS.join(' > ')}`)
      .option('--summary-json <file>', 'also write a short machine-readable summary'),
  ).action(action((o: string, n: string, opts) => runCheckCommand(o, n, opts, io)));

  program
    .command('demo')
    .description('run the whole job on the invented demo scenario in demo-data/ and print the report')
    .option('--format <format>', 'text | json | md | csv | html', 'text')
    .option('--out <file>', 'write the report to a file')
    .option('--limit <n>', 'text report: show at most N rows per list')
    .option('--verdict <list>', 'text report: show only these verdicts')
    .option('--no-color', 'no colour')
    .action(action((opts) => runDemoCommand(opts, io)));

  program
    .command('import')
    .description('turn a published release into termdrift tables: language-subtags | gene-ontology')
    .argument('<kind>', 'language-subtags | gene-ontology')
    .argument('<input>', 'the published file (or package folder)')
    .requiredOption('--out <dir>', 'folder to write release.tsv, history.tsv, hierarchy.tsv into')
    .action(action((kind: string, input: string, opts) => runImport(kind, input, opts, out)));

  return program;
}

export async function main(argv: string[]): Promise<void> {
  const program = buildProgram();
  try {
    await program.parseAsync(argv);
  } catch (err) {
    if (err instanceof CommanderError) {
      process.exitCode = err.exitCode === 0 ? EXIT.ok : EXIT.badInput;
      return;
    }
    if (err instanceof TermdriftError) {
      process.stderr.write(`termdrift: ${err.describe()}\n`);
      process.exitCode = EXIT.badInput;
      return;
    }
    const e = err as Error;
    process.stderr.write(`termdrift: internal error: ${e?.message ?? String(err)}\n  this is a bug in termdrift; please report it with the command you ran\n`);
    if (process.env.TERMDRIFT_DEBUG) process.stderr.write(`${e?.stack}\n`);
    process.exitCode = 70;
  }
}

await main(process.argv);
