/**
 * The importer registry the CLI exposes as `termdrift import KIND INPUT --out DIR`, run on
 * the IANA Language Subtag Registry of File-Date 2025-08-25 (npm language-subtag-registry@0.4.2,
 * installed as lsr-2025). The gene-ontology importer is run in geneOntology.test.ts.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { IMPORTERS, IMPORTER_KINDS, type PublisherNote } from '../../src/importers/index.js';
import { loadHierarchy, loadHistory, loadRelease } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';

describe('IMPORTERS', () => {
  it('has one entry per kind, each with a description', () => {
    expect(Object.keys(IMPORTERS).sort()).toEqual([...IMPORTER_KINDS].sort());
    for (const kind of IMPORTER_KINDS) expect(IMPORTERS[kind].describe.length).toBeGreaterThan(20);
  });

  it('language-subtags writes the tables, the publisher notes and the source', async () => {
    const out = join(tempDir(), 'new-folder');
    const input = join(process.cwd(), 'node_modules', 'lsr-2025');
    const run = await IMPORTERS['language-subtags'].run(input, out);
    expect(run.files.map((f) => f.slice(out.length + 1))).toEqual(['release.tsv', 'history.tsv', 'hierarchy.tsv', 'publisher-notes.json', 'source.json']);
    expect(run.diagnostics).toEqual([]);
    expect(run.counts).toMatchObject({ records: 9281, releaseRows: 9806, historyRows: 599, hierarchyRows: 545, publisherNotes: 298, replacedControlChars: 0 });

    const release = await loadRelease(join(out, 'release.tsv'));
    expect(release.diagnostics).toEqual([]);
    expect(release.conceptCount).toBe(9281);
    expect(release.termCount).toBe(run.counts.releaseRows);
    const history = await loadHistory(join(out, 'history.tsv'));
    // 166 replaced_by + 251 same_as (Preferred-Value) + 182 consider ("see X, Y" comments).
    expect(history.accounting).toMatchObject({ read: 599, used: 599, rejected: 0 });
    const hierarchy = await loadHierarchy(join(out, 'hierarchy.tsv'));
    expect(hierarchy.accounting).toMatchObject({ read: 545, used: 545, rejected: 0 });

    const notes = JSON.parse(readFileSync(join(out, 'publisher-notes.json'), 'utf8')) as PublisherNote[];
    expect(notes).toHaveLength(298);
    expect(notes.find((n) => n.id === 'language:ais')?.seeAlso).toEqual(['language:ami', 'language:szy']);
    expect(JSON.parse(readFileSync(join(out, 'source.json'), 'utf8'))).toMatchObject({ importer: 'language-subtags', fileDate: '2025-08-25', format: 'json' });
  });

  it('rejects an input that holds no registry with a coded error', async () => {
    await expect(IMPORTERS['language-subtags'].run(tempDir(), tempDir())).rejects.toMatchObject({ code: 'file_not_found' });
    await expect(IMPORTERS['gene-ontology'].run('/nonexistent/GO.sqlite', tempDir())).rejects.toMatchObject({ code: 'file_not_found' });
  });
});
