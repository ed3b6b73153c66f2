/**
 * The ground-truth generator's command line:
 *
 *   gen --concepts N --seed S --out DIR [--mappings-every K] [--gzip]
 *
 * writes DIR/old.tsv, new.tsv, old-hierarchy.tsv, new-hierarchy.tsv, history.tsv,
 * mappings.tsv, truth-changes.tsv and truth-mappings.tsv (each with `.gz` under --gzip) and
 * prints what it made. Bad flags are a usage error (exit code 2).
 */
import { Command, CommanderError, InvalidArgumentError } from 'commander';
import { TermdriftError, UsageError } from '../errors.js';
import { CHANGE_KINDS } from '../classify/types.js';
import { generateDataset } from './dataset.js';
import { writeDataset } from './writeDataset.js';

function positiveInt(flag: string) {
  return (value: string): number => {
    const n = Number(value);
    if (!/^\d+$/.test(value) || !Number.isSafeInteger(n) || n < 1) throw new InvalidArgumentError(`${flag} must be a positive whole number, got ${JSON.stringify(value)}`);
    return n;
  };
}

export interface GenOptions {
  concepts: number;
  seed: string;
  out: string;
  mappingsEvery: number;
  gzip: boolean;
}

/** Generate and write a dataset; returns the summary lines. */
export async function runGen(o: GenOptions): Promise<string[]> {
  if (!o.out) throw new UsageError('--out is required', 'give the folder to write into, e.g. --out /tmp/gen');
  const seed = /^-?\d+$/.test(o.seed) ? Number(o.seed) : o.seed;
  const t0 = performance.now();
  const data = generateDataset({ concepts: o.concepts, seed, mappingsEvery: o.mappingsEvery });
  const t1 = performance.now();
  const { paths, rows } = await writeDataset(o.out, data, { gzip: o.gzip });
  const t2 = performance.now();
  const lines = [
    `generated ${o.concepts} concepts (seed ${o.seed}) in ${((t1 - t0) / 1000).toFixed(1)} s, wrote in ${((t2 - t1) / 1000).toFixed(1)} s`,
    `old release: ${rows.old} term rows; new release: ${rows.new} term rows; history: ${rows.history} rows; mappings: ${rows.mappings}`,
    `injected changes: ${data.injected.changes.length} (${CHANGE_KINDS.map((k) => `${k} ${data.injected.injected[k]}`).join(', ')}); cosmetic edits: ${data.injected.cosmetic.length}`,
    ...Object.values(paths).map((p) => `  ${p}`),
  ];
  return lines;
}

export function buildGenProgram(): Command {
  return new Command()
    .name('gen')
    .description('generate a synthetic release pair with every change kind injected at known places, a mapping set, and their truth tables')
    .requiredOption('--concepts <n>', 'number of concepts in the old release', positiveInt('--concepts'))
    .option('--seed <seed>', 'seed (same seed, same files)', '1')
    .requiredOption('--out <dir>', 'folder to write the files into')
    .option('--mappings-every <k>', 'about one mapping per K concepts', positiveInt('--mappings-every'), 10)
    .option('--gzip', 'write .tsv.gz files', false)
    .showHelpAfterError('(run with --help for the usage)')
    .exitOverride();
}

export async function main(argv: string[]): Promise<number> {
  const program = buildGenProgram();
  try {
    program.parse(argv);
    const lines = await runGen(program.opts<GenOptions>());
    process.stdout.write(lines.join('\n') + '\n');
    return 0;
  } catch (err) {
    if (err instanceof CommanderError) return err.exitCode === 0 ? 0 : 2;
    if (err instanceof TermdriftError) {
      process.stderr.write(`gen: ${err.describe()}\n`);
      return 2;
    }
    if (err instanceof RangeError) {
      process.stderr.write(`gen: ${err.message}\n`);
      return 2;
    }
    throw err;
  }
}

