/** `termdrift import KIND INPUT --out DIR`: turn a published release into termdrift's tables. */
import { IMPORTERS, IMPORTER_KINDS, type ImporterKind } from '../importers/index.js';
import { UsageError } from '../errors.js';
import { EXIT, type ExitCode } from './exitCode.js';
import { formatDiagnostic } from '../render/diagnostics.js';

export async function runImport(kind: string, input: string, opts: { out?: string }, out: (s: string) => void): Promise<ExitCode> {
  if (!(IMPORTER_KINDS as readonly string[]).includes(kind)) {
    throw new UsageError(`unknown importer "${kind}"`, `use one of: ${IMPORTER_KINDS.join(', ')}`);
  }
  if (!opts.out) throw new UsageError('--out DIR is required', 'name the folder to write release.tsv, history.tsv and hierarchy.tsv into');
  const result = await IMPORTERS[kind as ImporterKind].run(input, opts.out);
  for (const f of result.files) out(`wrote ${f}`);
  for (const [k, v] of Object.entries(result.counts)) out(`  ${k}: ${v}`);
  for (const d of result.diagnostics) out(formatDiagnostic(d));
  return EXIT.ok;
}
