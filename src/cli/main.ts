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
