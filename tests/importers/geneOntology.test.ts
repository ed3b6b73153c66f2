/**
 * The Gene Ontology importer, checked against the real GO.sqlite of Bioconductor GO.db as
 * Debian ships it (package r-bioc-go.db 3.16.0-1, built from GO's go-basic.obo of
 * 2022-07-01). The file is fetched by scripts/fetch-go.sh into the cache folder outside the
 * repo; the GO tests skip, saying why, only when it is absent and cannot be fetched.
 *
 * Checks come from three places: the file's own tables read here with plain SQL (including
 * GO.db's `map_counts`, the publisher's counts), common knowledge of GO (its three roots),
 * and well-known GO terms recalled from memory (marked so).
 */
import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it, type TestContext } from 'vitest';
import type BetterSqlite3 from 'better-sqlite3';
import { goCacheDir, readGeneOntology, resolveGoSqlite, type GeneOntologyRelease } from '../../src/importers/geneOntology.js';
import { IMPORTERS } from '../../src/importers/index.js';
import { loadHierarchy, loadHistory, loadRelease } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';

const Database = createRequire(import.meta.url)('better-sqlite3') as typeof BetterSqlite3;
const FETCH = join(process.cwd(), 'scripts', 'fetch-go.sh');

let sqlitePath: string | null = null;
let unavailable = '';
let go: GeneOntologyRelease;
let db: BetterSqlite3.Database;

beforeAll(() => {
  const cached = join(goCacheDir(), 'GO.sqlite');
  if (!existsSync(cached)) {
    const r = spawnSync('bash', [FETCH], { encoding: 'utf8', timeout: 280_000 });
    if (r.status !== 0 || !existsSync(cached)) {
      unavailable = `GO.sqlite is not cached at ${cached} and scripts/fetch-go.sh could not fetch it (exit ${r.status ?? r.signal}): ${(r.stderr ?? '').trim().split('\n').slice(-3).join(' / ')}`;
      return;
    }
  }
  sqlitePath = cached;
  go = readGeneOntology(cached);
  db = new Database(cached, { readonly: true });
}, 300_000);

/** Skip with the reason when GO.sqlite could not be had. */
function needGo(ctx: TestContext): void {
  if (sqlitePath === null) ctx.skip(unavailable);
}

const sql = <T>(q: string): T[] => db.prepare(q).all() as T[];
const one = (q: string): number => (db.prepare(q).pluck().get() as number);
const preferred = () => new Map(go.release.filter((r) => r.term_type === 'preferred').map((r) => [r.concept_id, r]));

describe('GO.db (r-bioc-go.db 3.16.0-1, GO release 2022-07-01)', () => {
  it('reads the version from the metadata table', (ctx) => {
    needGo(ctx);
    expect(go.meta.date).toBe('2022-07-01');
    expect(go.meta.sourceName).toBe('Gene Ontology');
    expect(go.meta.sourceUrl).toBe('http://current.geneontology.org/ontology/go-basic.obo');
    expect(go.meta.schema).toBe('GO_DB');
    expect(go.meta.schemaVersion).toBe('2.1');
  });

  it('counts concepts by category, matching the file’s tables and its map_counts', (ctx) => {
    needGo(ctx);
    // Measured on GO.db 3.16.0 (GO 2022-07-01).
    expect(go.counts).toMatchObject({
      'category.BP': 28140,
      'category.MF': 11238,
      'category.CC': 4180,
      'obsolete.BP': 2401,
      'obsolete.MF': 1215,
      'obsolete.CC': 294,
      conceptsActive: 43558,
      conceptsInactive: 3910,
      pseudoTermsSkipped: 1,
    });
    // The same from plain SQL.
    for (const { ontology, n } of sql<{ ontology: string; n: number }>("select ontology, count(*) n from go_term where ontology <> 'universal' group by ontology")) {
      expect(go.counts[`category.${ontology}`]).toBe(n);
    }
    for (const { ontology, n } of sql<{ ontology: string; n: number }>('select ontology, count(*) n from go_obsolete group by ontology')) {
      expect(go.counts[`obsolete.${ontology}`]).toBe(n);
    }
    // GO.db's own counts: TERM includes the `all` pseudo-term, OBSOLETE the obsolete terms.
    const mapCounts = new Map(sql<{ map_name: string; count: number }>('select map_name, count from map_counts').map((r) => [r.map_name, r.count]));
    expect(mapCounts.get('TERM')).toBe(go.counts.conceptsActive + go.counts.pseudoTermsSkipped);
    expect(mapCounts.get('OBSOLETE')).toBe(go.counts.conceptsInactive);
    const concepts = new Set(go.release.map((r) => r.concept_id));
    expect(concepts.size).toBe(43558 + 3910);
  });

  it('has the three roots with their names (common knowledge of GO) and no is_a parent above them', (ctx) => {
    needGo(ctx);
    const p = preferred();
    expect(p.get('GO:0008150')).toMatchObject({ term: 'biological_process', category: 'BP', status: 'active' });
    expect(p.get('GO:0003674')).toMatchObject({ term: 'molecular_function', category: 'MF', status: 'active' });
    expect(p.get('GO:0005575')).toMatchObject({ term: 'cellular_component', category: 'CC', status: 'active' });
    // Measured: the roots are the only active terms without an is_a parent (GO.db's `all` is left out).
    const withParent = new Set(go.hierarchy.map((h) => h.concept_id));
    const orphans = [...p.values()].filter((r) => r.status === 'active' && !withParent.has(r.concept_id)).map((r) => r.concept_id);
    expect(orphans.sort()).toEqual(['GO:0003674', 'GO:0005575', 'GO:0008150']);
    expect(go.counts.edgesToPseudoTermSkipped).toBe(3);
  });

  it('names well-known GO terms as expected (from memory)', (ctx) => {
    needGo(ctx);
    const p = preferred();
    expect(p.get('GO:0006915')).toMatchObject({ term: 'apoptotic process', category: 'BP' });
    expect(p.get('GO:0005634')).toMatchObject({ term: 'nucleus', category: 'CC' });
    expect(p.get('GO:0005739')).toMatchObject({ term: 'mitochondrion', category: 'CC' });
    expect(p.get('GO:0003677')).toMatchObject({ term: 'DNA binding', category: 'MF' });
    expect(p.get('GO:0016301')).toMatchObject({ term: 'kinase activity', category: 'MF' });
  });

  it('marks every obsolete term inactive, with its "obsolete " label and no synonyms or parents', (ctx) => {
    needGo(ctx);
    const obsolete = new Set(sql<{ go_id: string }>('select go_id from go_obsolete').map((r) => r.go_id));
    expect(obsolete.size).toBe(3910);
    const rows = go.release.filter((r) => obsolete.has(r.concept_id));
    expect(rows).toHaveLength(3910);
    for (const r of rows) {
      expect(r.status).toBe('inactive');
      expect(r.term_type).toBe('preferred');
      // OBO Foundry obsoletion: the label of an obsolete term is prefixed "obsolete ".
      expect(r.term.startsWith('obsolete ')).toBe(true);
    }
    expect(go.release.filter((r) => r.status === 'inactive')).toHaveLength(3910);
    expect(go.hierarchy.some((h) => obsolete.has(h.concept_id) || obsolete.has(h.parent_id))).toBe(false);
    expect(preferred().get('GO:0016265')).toMatchObject({ term: 'obsolete death', status: 'inactive', category: 'BP' });
  });

  it('writes synonyms as terms and secondary ids as same_as history, never as terms', (ctx) => {
    needGo(ctx);
    expect(go.counts.secondaryIds).toBe(one('select count(*) from go_synonym where like_go_id = 1'));
    expect(go.counts.secondaryIds).toBe(3450);
    expect(go.history).toHaveLength(3450);
    expect(go.release.some((r) => /^GO:\d{7}$/.test(r.term))).toBe(false);
    const concepts = preferred();
    for (const h of go.history) {
      expect(h.relation).toBe('same_as');
      expect(concepts.has(h.old_id)).toBe(false);
      expect(concepts.get(h.new_id)?.status).toBe('active');
    }
    // From the file: GO:0019952 and GO:0050876 are alt_ids of GO:0000003 "reproduction".
    expect(go.history.filter((h) => h.new_id === 'GO:0000003').map((h) => h.old_id)).toEqual(['GO:0019952', 'GO:0050876']);
    expect(go.secondary).toHaveLength(3450);
    // Every synonym row is accounted for.
    const c = go.counts;
    expect(c.synonyms + c.synonymsSameAsName + c.synonymsRepeated + c.secondaryIds + c.synonymsOfPseudoTermSkipped + c.synonymsOfUnknownTermSkipped).toBe(c.synonymRows);
    expect(c.synonymRows).toBe(one('select count(*) from go_synonym'));
    expect(go.release.filter((r) => r.term_type === 'synonym')).toHaveLength(c.synonyms);
  });

  it('keeps only is_a parents, within one sub-ontology, and counts the rest by type', (ctx) => {
    needGo(ctx);
    const isa = one("select (select count(*) from go_bp_parents where relationship_type = 'isa') + (select count(*) from go_mf_parents where relationship_type = 'isa') + (select count(*) from go_cc_parents where relationship_type = 'isa')");
    expect(go.hierarchy).toHaveLength(isa - go.counts.edgesToPseudoTermSkipped);
    expect(go.counts.isaEdges).toBe(go.hierarchy.length);
    expect(go.counts['parents.BP.part_of']).toBe(one("select count(*) from go_bp_parents where relationship_type = 'part of'"));
    expect(go.counts['parents.BP.negatively_regulates']).toBe(one("select count(*) from go_bp_parents where relationship_type = 'negatively regulates'"));
    const p = preferred();
    for (const h of go.hierarchy) {
      expect(p.get(h.concept_id)?.category).toBe(p.get(h.parent_id)?.category);
    }
    // From the file: "mitochondrion inheritance" (GO:0000001) is_a GO:0048308 and GO:0048311.
    expect(go.hierarchy.filter((h) => h.concept_id === 'GO:0000001').map((h) => h.parent_id).sort()).toEqual(
      sql<{ go_id: string }>("select t.go_id from go_bp_parents p join go_term t on t._id = p._parent_id join go_term c on c._id = p._id where c.go_id = 'GO:0000001' and p.relationship_type = 'isa'").map((r) => r.go_id).sort(),
    );
  });

  it('runs as IMPORTERS["gene-ontology"] into tables that termdrift’s loaders read without diagnostics', async (ctx) => {
    needGo(ctx);
    const out = tempDir();
    const run = await IMPORTERS['gene-ontology'].run(goCacheDir(), out);
    expect(run.files.map((f) => f.slice(out.length + 1))).toEqual(['release.tsv', 'history.tsv', 'hierarchy.tsv', 'source.json']);
    expect(run.counts).toMatchObject({ releaseRows: go.release.length, historyRows: 3450, hierarchyRows: go.hierarchy.length, replacedControlChars: 0 });
    const release = await loadRelease(join(out, 'release.tsv'));
    expect(release.diagnostics).toEqual([]);
    expect(release.conceptCount).toBe(43558 + 3910);
    expect(release.termCount).toBe(go.release.length);
    expect((await loadHistory(join(out, 'history.tsv'))).diagnostics).toEqual([]);
    const hierarchy = await loadHierarchy(join(out, 'hierarchy.tsv'));
    expect(hierarchy.diagnostics).toEqual([]);
    expect(hierarchy.accounting.used).toBe(go.hierarchy.length);
    expect(JSON.parse(readFileSync(join(out, 'source.json'), 'utf8'))).toMatchObject({ importer: 'gene-ontology', date: '2022-07-01' });
  });

  it('fetch-go.sh is idempotent: a second run uses the cache and prints the same path', (ctx) => {
    needGo(ctx);
    const r = spawnSync('bash', [FETCH], { encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toBe(sqlitePath);
    expect(r.stderr).toContain('cached:');
  });
});

describe('readGeneOntology input errors', () => {
  it('says file_not_found for a missing file, naming it', () => {
    expect(() => readGeneOntology('/nonexistent/GO.sqlite')).toThrow(expect.objectContaining({ code: 'file_not_found', location: { file: '/nonexistent/GO.sqlite' } }));
  });

  it('says file_unreadable for a file that is not SQLite', () => {
    const path = join(tempDir(), 'not.sqlite');
    writeFileSync(path, 'concept_id\tterm\n');
    expect(() => readGeneOntology(path)).toThrow(expect.objectContaining({ code: 'file_unreadable' }));
  });

  it('names the GO.db tables an SQLite file lacks', () => {
    const path = join(tempDir(), 'other.sqlite');
    const other = new Database(path);
    other.exec('create table go_term (_id integer primary key, go_id text, term text, ontology text)');
    other.close();
    expect(() => readGeneOntology(path)).toThrow(/go_obsolete, go_synonym, metadata, go_bp_parents, go_mf_parents, go_cc_parents missing/);
  });

  it('resolves a folder to the GO.sqlite inside it, and says so when there is none', async () => {
    await expect(resolveGoSqlite(tempDir())).rejects.toMatchObject({ code: 'file_not_found' });
  });
});
