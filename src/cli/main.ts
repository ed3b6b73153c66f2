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
import { runApplyCommand } from './applyCommand.js';
import { runHistoryCommand } from './historyCommand.js';
import { FAIL_LEVELS } from '../rank/failOn.js';
import { VERSION } from '../version.js';
import { guardMemory, inputFilesOf, RanInChild } from './heap.js';
import { createProgress, SILENT, type Progress } from './progress.js';

const out = (s: string) => process.stdout.write(s.endsWith('\n') ? s : s + '\n');

function action<A extends unknown[]>(fn: (...args: A) => Promise<number>) {
  return async (...args: A) => {
    process.exitCode = await fn(...args);
  };
}

export function buildProgram(progress: Progress = SILENT): Command {
  const program = new Command();
  program
    .name('termdrift')
    .description('Compare two releases of a terminology, find structural changes, re-score local mappings and report by impact.')
    .version(VERSION)
    .showHelpAfterError('(run with --help for the usage)')
    .exitOverride()
    // Before a command reads its inputs: enough memory for them, or a clear stop (cli/heap.ts).
    .hook('preAction', (_program, command) => guardMemory(inputFilesOf(command.name(), command.args, command.opts())));

  program
    .command('validate')
    .description('check one input file and list every problem with file, line and column')
    .argument('<file>', 'the table to check (CSV or TSV, optionally .gz)')
    .requiredOption('--kind <kind>', 'release | mapping | hierarchy | history')
    .option('--columns <list>', 'header names of our columns, e.g. concept_id=CODE,term=STR')
    .option('--format <format>', 'text | json', 'text')
    .action(action((file: string, opts) => runValidate(file, opts, out, progress)));

  const io: Io = { out, isTTY: Boolean(process.stdout.isTTY), progress };
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
      .option('--summary-json <file>', 'also write a short machine-readable summary')
      .option('--state <dir>', 'record the run and read earlier decisions in this folder (default .termdrift)')
      .option('--no-state', 'record nothing and read no earlier decisions'),
  ).action(action((o: string, n: string, opts) => runCheckCommand(o, n, opts, io)));

  program
    .command('demo')
    .description('run the whole job on the invented demo scenario in demo-data/ and print the report')
    .option('--format <format>', 'text | json | md | csv | html', 'text')
    .option('--out <file>', 'write the report to a file')
    .option('--limit <n>', 'text report: show at most N rows per list')
    .option('--verdict <list>', 'text report: show only these verdicts')
    .option('--no-color', 'no colour')
    .option('--state <dir>', 'record the run in this folder (the demo records nothing otherwise)')
    .action(action((opts) => runDemoCommand(opts, io)));

  program
    .command('apply')
    .description("apply a reviewer's decisions (a filled-in check --format csv worklist) to a mapping set")
    .argument('<worklist>', 'the worklist CSV with decision (accept | keep | remap | retire), new_target, reviewer, note filled in')
    .requiredOption('--mappings <file>', 'the mapping set the worklist was made from')
    .requiredOption('--out <file>', 'where to write the updated mapping set (- for standard output)')
    .option('--out-format <format>', 'csv | tsv | sssom | fhir (default: by the name of --out: .json FHIR ConceptMap, .sssom.tsv SSSOM, .csv CSV; else the input\'s format)')
    .option('--audit <file>', 'append one row per decision to this CSV audit log')
    .option('--release-file <file>', 'the new release (default: the one a recorded check run read, by the worklist\'s new_sha256)')
    .option('--release <label>', "release label for the audit log, the state and the output (default: the worklist's new_release)")
    .option('--now <time>', 'time of the decisions for the audit log (ISO; "now" reads the clock; default: the worklist\'s decided_at, else none)')
    .option('--state <dir>', 'record the decisions in this folder (default: .termdrift when it exists)')
    .option('--no-state', 'record no decisions')
    .option('--set-id <uri>', 'SSSOM mapping_set_id / FHIR ConceptMap.url when the input has none')
    .option('--license <uri>', 'SSSOM license when the input has none')
    .option('--set-version <version>', 'SSSOM mapping_set_version / FHIR ConceptMap.version (default: the release label)')
    .option('--local-prefix <prefix=iri>', 'SSSOM: CURIE prefix for local codes that have none')
    .option('--target-prefix <prefix=iri>', 'SSSOM: CURIE prefix for targets that have none')
    .option('--local-system <uri>', 'FHIR: group.source, the code system of the local codes')
    .option('--target-system <uri>', 'FHIR: group.target, the code system of the targets')
    .action(action((worklist: string, opts) => runApplyCommand(worklist, opts, { out, err: (s) => process.stderr.write(s.endsWith('\n') ? s : s + '\n') })));

  program
    .command('history')
    .description('score trends of every mapping across the recorded runs, and the mappings whose score keeps falling')
    .option('--state <dir>', 'the state folder', '.termdrift')
    .option('--code <code>', 'show one local code, release by release')
    .option('--format <format>', 'text | json', 'text')
    .action(action((opts) => runHistoryCommand(opts, out)));

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
  const progress = createProgress();
  const program = buildProgram(progress);
  try {
    await program.parseAsync(argv);
  } catch (err) {
    progress.stop();
    if (err instanceof RanInChild) {
      process.exitCode = err.exitCode;
      return;
    }
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
  } finally {
    progress.stop();
  }
}

await main(process.argv);
