/**
 * Importer for the Gene Ontology as carried by Bioconductor's GO.db (Debian package
 * `r-bioc-go.db`, file `GO.sqlite`; fetched by `scripts/fetch-go.sh`).
 *
 * The GO.db schema (DBSCHEMA GO_DB, DBSCHEMAVERSION 2.1), as found in the file:
 *  - `go_term(_id, go_id, term, ontology, definition)`: current terms; `ontology` is BP, MF or
 *    CC, plus one pseudo-term `all` of ontology `universal` that GO.db adds above the roots;
 *  - `go_obsolete(go_id, term, ontology, definition)`: obsolete terms (disjoint from go_term,
 *    no synonyms, no parents; GO.db keeps no replaced_by / consider);
 *  - `go_synonym(_id, synonym, secondary, like_go_id)`: synonyms of current terms, and the
 *    term's secondary ids (alt_id) as rows with `like_go_id = 1` and `secondary` set. GO.db
 *    drops the OBO synonym scope (EXACT/BROAD/NARROW/RELATED), so every synonym is written
 *    as a plain `synonym`;
 *  - `go_bp_parents`, `go_mf_parents`, `go_cc_parents(_id, _parent_id, relationship_type)`:
 *    direct parents with types `isa`, `part of`, `regulates`, `positively regulates`,
 *    `negatively regulates`;
 *  - `metadata(name, value)`: GOSOURCENAME, GOSOURCEURL, GOSOURCEDATE, DBSCHEMA, ...
 *
 * Mapping:
 *  - concept_id = GO id; preferred term = term name; synonyms from go_synonym (a synonym
 *    equal to the name, or repeated, is written once and counted); category = BP, MF or CC;
 *  - obsolete terms → status inactive (their names keep GO's `obsolete ` prefix);
 *  - hierarchy: only `isa` parents (termdrift's hierarchy is a subsumption hierarchy; the
 *    other relationship types are counted, not written); edges to the `all` pseudo-term are
 *    left out with it, and counted;
 *  - history: each secondary id → its primary id, relation `same_as` (OBO: an alt_id is an
 *    identifier merged into the surviving term), also returned as `secondary`.
 *
 * better-sqlite3 is loaded lazily, so the rest of termdrift runs where it is not installed.
 */
import { createRequire } from 'node:module';
import { promises as fsp, statSync } from 'node:fs';
import { join } from 'node:path';
import type BetterSqlite3 from 'better-sqlite3';
import { InputError } from '../errors.js';
import type { HierarchyRow, HistoryRow, ReleaseRow } from './types.js';

/** GO's three sub-ontologies, as GO.db abbreviates them, with their root terms' names. */
export const GO_ONTOLOGIES = { BP: 'biological_process', MF: 'molecular_function', CC: 'cellular_component' } as const;
export type GoOntology = keyof typeof GO_ONTOLOGIES;

const PARENT_TABLES = { BP: 'go_bp_parents', MF: 'go_mf_parents', CC: 'go_cc_parents' } as const;
const REQUIRED_TABLES = ['go_term', 'go_obsolete', 'go_synonym', 'metadata', ...Object.values(PARENT_TABLES)];
const GO_ID = /^GO:\d{7}$/;

export interface GeneOntologyMeta {
  /** GOSOURCEDATE: date of the GO release GO.db was built from. */
  date: string | null;
  /** GOSOURCENAME and GOSOURCEURL. */
  sourceName: string | null;
  sourceUrl: string | null;
  /** DBSCHEMA and DBSCHEMAVERSION of the GO.db file. */
  schema: string | null;
  schemaVersion: string | null;
  /** Every row of the metadata table. */
  all: Record<string, string>;
}

export interface SecondaryId {
  secondary_id: string;
  primary_id: string;
}

export interface GeneOntologyRelease {
  release: ReleaseRow[];
  hierarchy: HierarchyRow[];
  history: HistoryRow[];
  secondary: SecondaryId[];
  meta: GeneOntologyMeta;
  counts: Record<string, number>;
}

type Database = BetterSqlite3.Database;

function openDatabase(path: string): Database {
  let ctor: typeof BetterSqlite3;
  try {
    ctor = createRequire(import.meta.url)('better-sqlite3') as typeof BetterSqlite3;
  } catch (e) {
    throw new InputError('file_unreadable', `cannot read SQLite files here: better-sqlite3 is not installed (${(e as Error).message})`, {
      location: { file: path },
      fix: 'install it: npm install --save-dev --save-exact better-sqlite3@12',
    });
  }
  let st;
  try {
    st = statSync(path);
  } catch {
    throw new InputError('file_not_found', `no such file: ${path}`, { location: { file: path }, fix: 'run scripts/fetch-go.sh, or give the path of GO.sqlite' });
  }
  if (!st.isFile()) throw new InputError('not_a_file', `${path} is not a file`, { location: { file: path }, fix: 'give the path of GO.sqlite' });
  let db: Database;
  try {
    db = new ctor(path, { readonly: true, fileMustExist: true });
    db.prepare('select count(*) from sqlite_master').get();
  } catch (e) {
    throw new InputError('file_unreadable', `not an SQLite database: ${(e as Error).message}`, { location: { file: path }, fix: 'give the GO.sqlite of the GO.db package (scripts/fetch-go.sh)' });
  }
  const tables = new Set((db.prepare("select name from sqlite_master where type = 'table'").all() as { name: string }[]).map((r) => r.name));
  const missing = REQUIRED_TABLES.filter((t) => !tables.has(t));
  if (missing.length > 0) {
    db.close();
    throw new InputError('file_unreadable', `not a GO.db database: table${missing.length > 1 ? 's' : ''} ${missing.join(', ')} missing`, {
      location: { file: path },
      fix: 'give the GO.sqlite of the GO.db package (scripts/fetch-go.sh)',
    });
  }
  return db;
}

/** Read GO.db's SQLite file into termdrift's tables (see the file header for the mapping). */
export function readGeneOntology(sqlitePath: string): GeneOntologyRelease {
  const db = openDatabase(sqlitePath);
  try {
    return readOpen(db);
  } finally {
    db.close();
  }
}

function readOpen(db: Database): GeneOntologyRelease {
  const counts: Record<string, number> = {
    goTermRows: 0,
    goObsoleteRows: 0,
    synonymRows: 0,
    conceptsActive: 0,
    conceptsInactive: 0,
    synonyms: 0,
    synonymsSameAsName: 0,
    synonymsRepeated: 0,
    secondaryIds: 0,
    pseudoTermsSkipped: 0,
    obsoleteAlsoCurrentSkipped: 0,
    synonymsOfPseudoTermSkipped: 0,
    synonymsOfUnknownTermSkipped: 0,
    isaEdges: 0,
    edgesToPseudoTermSkipped: 0,
    edgesWithUnknownTermSkipped: 0,
  };
  for (const o of Object.keys(GO_ONTOLOGIES)) {
    counts[`category.${o}`] = 0;
    counts[`obsolete.${o}`] = 0;
  }

  const metaRows = db.prepare('select name, value from metadata').all() as { name: string; value: string | null }[];
  const all: Record<string, string> = {};
  for (const r of metaRows) all[r.name] = r.value ?? '';
  const meta: GeneOntologyMeta = {
    date: all.GOSOURCEDATE ?? null,
    sourceName: all.GOSOURCENAME ?? null,
    sourceUrl: all.GOSOURCEURL ?? null,
    schema: all.DBSCHEMA ?? null,
    schemaVersion: all.DBSCHEMAVERSION ?? null,
    all,
  };

  interface Concept {
    id: string;
    name: string;
    ontology: string;
    status: 'active' | 'inactive';
    synonyms: string[];
  }
  const concepts: Concept[] = [];
  const byRowId = new Map<number, Concept | null>();

  for (const r of db.prepare('select _id, go_id, term, ontology from go_term order by go_id').iterate() as IterableIterator<{ _id: number; go_id: string; term: string; ontology: string }>) {
    counts.goTermRows++;
    if (!GO_ID.test(r.go_id)) {
      // GO.db's `all` term (ontology `universal`) above the three roots: not a GO term.
      counts.pseudoTermsSkipped++;
      byRowId.set(r._id, null);
      continue;
    }
    const c: Concept = { id: r.go_id, name: r.term, ontology: r.ontology, status: 'active', synonyms: [] };
    concepts.push(c);
    byRowId.set(r._id, c);
    counts.conceptsActive++;
    counts[`category.${r.ontology}`] = (counts[`category.${r.ontology}`] ?? 0) + 1;
  }
  const currentIds = new Set(concepts.map((c) => c.id));
  for (const r of db.prepare('select go_id, term, ontology from go_obsolete order by go_id').iterate() as IterableIterator<{ go_id: string; term: string; ontology: string }>) {
    counts.goObsoleteRows++;
    if (currentIds.has(r.go_id)) {
      counts.obsoleteAlsoCurrentSkipped++;
      continue;
    }
    concepts.push({ id: r.go_id, name: r.term, ontology: r.ontology, status: 'inactive', synonyms: [] });
    counts.conceptsInactive++;
    counts[`obsolete.${r.ontology}`] = (counts[`obsolete.${r.ontology}`] ?? 0) + 1;
  }
  concepts.sort((a, b) => (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));

  const secondary: SecondaryId[] = [];
  const synonymSeen = new Map<Concept, Set<string>>();
  for (const r of db.prepare('select _id, synonym, secondary, like_go_id from go_synonym order by rowid').iterate() as IterableIterator<{ _id: number; synonym: string; secondary: string | null; like_go_id: number | null }>) {
    counts.synonymRows++;
    const c = byRowId.get(r._id);
    if (c === null) {
      counts.synonymsOfPseudoTermSkipped++;
      continue;
    }
    if (c === undefined) {
      counts.synonymsOfUnknownTermSkipped++;
      continue;
    }
    if (r.like_go_id === 1 || r.secondary !== null || GO_ID.test(r.synonym)) {
      secondary.push({ secondary_id: r.secondary ?? r.synonym, primary_id: c.id });
      counts.secondaryIds++;
      continue;
    }
    if (r.synonym === c.name) {
      counts.synonymsSameAsName++;
      continue;
    }
    let seen = synonymSeen.get(c);
    if (seen === undefined) synonymSeen.set(c, (seen = new Set()));
    if (seen.has(r.synonym)) {
      counts.synonymsRepeated++;
      continue;
    }
    seen.add(r.synonym);
    c.synonyms.push(r.synonym);
    counts.synonyms++;
  }

  const release: ReleaseRow[] = [];
  for (const c of concepts) {
    release.push({ concept_id: c.id, term: c.name, term_type: 'preferred', status: c.status, category: c.ontology });
    for (const s of c.synonyms) release.push({ concept_id: c.id, term: s, term_type: 'synonym', status: c.status, category: c.ontology });
  }

  const hierarchy: HierarchyRow[] = [];
  for (const [ontology, table] of Object.entries(PARENT_TABLES)) {
    const stmt = db.prepare(`select _id, _parent_id, relationship_type from ${table} order by rowid`);
    for (const r of stmt.iterate() as IterableIterator<{ _id: number; _parent_id: number; relationship_type: string }>) {
      const key = `parents.${ontology}.${r.relationship_type.replace(/\s+/g, '_')}`;
      counts[key] = (counts[key] ?? 0) + 1;
      if (r.relationship_type !== 'isa') continue;
      const child = byRowId.get(r._id);
      const parent = byRowId.get(r._parent_id);
      if (child === null || parent === null) {
        counts.edgesToPseudoTermSkipped++;
        continue;
      }
      if (child === undefined || parent === undefined) {
        counts.edgesWithUnknownTermSkipped++;
        continue;
      }
      hierarchy.push({ concept_id: child.id, parent_id: parent.id });
      counts.isaEdges++;
    }
  }

  secondary.sort((a, b) => (a.secondary_id < b.secondary_id ? -1 : a.secondary_id > b.secondary_id ? 1 : 0));
  const history: HistoryRow[] = secondary.map((s) => ({ old_id: s.secondary_id, new_id: s.primary_id, relation: 'same_as' }));
  counts.releaseRows = release.length;
  return { release, hierarchy, history, secondary, meta, counts };
}

/** Cache folder used by scripts/fetch-go.sh. */
export function goCacheDir(env: NodeJS.ProcessEnv = process.env): string {
  const root = env.TERMDRIFT_CACHE ?? join(env.HOME ?? '.', '.cache', 'termdrift');
  return join(root, 'go');
}

/** `input` itself when it is a file; `input/GO.sqlite` when it is a folder holding one. */
export async function resolveGoSqlite(input: string): Promise<string> {
  const st = await fsp.stat(input).catch(() => null);
  if (st === null) throw new InputError('file_not_found', `no such file or folder: ${input}`, { location: { file: input }, fix: 'run scripts/fetch-go.sh and give the path it prints' });
  if (st.isFile()) return input;
  const inside = join(input, 'GO.sqlite');
  if ((await fsp.stat(inside).catch(() => null))?.isFile()) return inside;
  throw new InputError('file_not_found', `no GO.sqlite in folder ${input}`, { location: { file: input }, fix: 'run scripts/fetch-go.sh and give the path it prints' });
}
