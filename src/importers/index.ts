/**
 * The importers: each turns one published release of a real terminology into the tables
 * termdrift reads. `IMPORTERS` is the registry the CLI exposes as
 * `termdrift import KIND INPUT --out DIR`.
 *
 * Every importer writes `release.tsv`, `history.tsv`, `hierarchy.tsv` and `source.json`
 * (what was read: file, version or date) into the output folder; the language-subtags
 * importer also writes `publisher-notes.json` (the registry's own account of each
 * deprecated record). `counts` says what was read, written and left out.
 */
import { promises as fsp } from 'node:fs';
import { join, resolve } from 'node:path';
import { languageSubtagsToRelease, loadLanguageSubtagRegistry } from './languageSubtags.js';
import { readGeneOntology, resolveGoSqlite } from './geneOntology.js';
import { writeReleaseTables } from './writeTables.js';
import type { ImportDiagnostic } from './types.js';

export * from './types.js';
export * from './languageSubtags.js';
export * from './geneOntology.js';
export { parseRecordJar } from './recordJar.js';
export type { JarAccounting, JarField, JarParse, JarRecord } from './recordJar.js';
export { renderTsv, tsvField, RELEASE_HEADER, HIERARCHY_HEADER, HISTORY_HEADER } from './writeTables.js';

export const IMPORTER_KINDS = ['language-subtags', 'gene-ontology'] as const;
export type ImporterKind = (typeof IMPORTER_KINDS)[number];

export interface ImportRun {
  files: string[];
  counts: Record<string, number>;
  /** Row-level problems met while reading the input (rejected records are counted too). */
  diagnostics: ImportDiagnostic[];
}

export interface Importer {
  describe: string;
  run(input: string, outDir: string): Promise<ImportRun>;
}

async function writeJson(path: string, value: unknown): Promise<string> {
  await fsp.writeFile(path, `${JSON.stringify(value, null, 2)}\n`, 'utf8');
  return path;
}

export const IMPORTERS: Record<ImporterKind, Importer> = {
  'language-subtags': {
    describe:
      'IANA Language Subtag Registry (BCP 47, RFC 5646): INPUT is the registry text file, a registry.json of the npm package language-subtag-registry (meta.json beside it), or that package\'s folder',
    async run(input, outDir) {
      const parsed = await loadLanguageSubtagRegistry(input);
      const out = languageSubtagsToRelease(parsed);
      const written = await writeReleaseTables(outDir, { release: out.release, history: out.history, hierarchy: out.hierarchy });
      const files = [...written.files];
      files.push(await writeJson(join(outDir, 'publisher-notes.json'), out.notes));
      files.push(
        await writeJson(join(outDir, 'source.json'), {
          importer: 'language-subtags',
          input: resolve(input),
          format: parsed.format,
          fileDate: parsed.fileDate,
        }),
      );
      return { files, counts: { ...out.counts, ...written.counts }, diagnostics: [...parsed.diagnostics, ...out.diagnostics] };
    },
  },
  'gene-ontology': {
    describe: 'Gene Ontology from the GO.sqlite of Bioconductor GO.db (Debian r-bioc-go.db; scripts/fetch-go.sh fetches it): INPUT is GO.sqlite or the folder holding it',
    async run(input, outDir) {
      const path = await resolveGoSqlite(input);
      const go = readGeneOntology(path);
      const written = await writeReleaseTables(outDir, { release: go.release, history: go.history, hierarchy: go.hierarchy });
      const files = [...written.files];
      files.push(await writeJson(join(outDir, 'source.json'), { importer: 'gene-ontology', input: resolve(path), ...go.meta }));
      return { files, counts: { ...go.counts, ...written.counts }, diagnostics: [] };
    },
  },
};
