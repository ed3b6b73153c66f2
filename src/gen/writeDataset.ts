/**
 * Streaming writers for generated datasets: releases, hierarchies, history, mappings and the
 * two truth tables, as the TSV files termdrift reads (UTF-8, LF, one header row).
 *
 * Lines are gathered into chunks of about 1 MiB and written with backpressure (a chunk waits
 * for 'drain' when the stream's buffer is full), so a release of 4 million rows is never held
 * as one string. With `gzip` each file goes through zlib and gets a `.gz` suffix (termdrift's
 * loaders read both). Fields go through importers/writeTables.ts `tsvField`, which replaces
 * tabs and line breaks and quotes a field that begins with a double quote; the synthetic
 * vocabulary has none, imported releases were cleaned by their importer already.
 */
import { createWriteStream, promises as fsp, type WriteStream } from 'node:fs';
import { once } from 'node:events';
import { join } from 'node:path';
import { createGzip, type Gzip } from 'node:zlib';
import { tsvField, type FieldTally, RELEASE_HEADER, HIERARCHY_HEADER, HISTORY_HEADER } from '../importers/writeTables.js';
import type { BaseConcept, BaseRelease, GenHistoryRow, GenMapping, MappingTruth, TruthChange } from './types.js';

const CHUNK = 1 << 20;

export class TsvWriter {
  private parts: string[] = [];
  private size = 0;
  readonly tally: FieldTally = { replacedControlChars: 0, quotedFields: 0 };
  rows = 0;

  private constructor(private readonly sink: Gzip | WriteStream, private readonly file: WriteStream) {}

  static open(path: string, gzip: boolean): TsvWriter {
    const file = createWriteStream(path);
    if (!gzip) return new TsvWriter(file, file);
    const z = createGzip({ level: 6 });
    z.pipe(file);
    return new TsvWriter(z, file);
  }

  /** Add one line (without its LF). */
  line(text: string): void {
    this.parts.push(text, '\n');
    this.size += text.length + 1;
  }

  /** Lines already joined, each ending in LF, counted as `rows` rows. */
  block(text: string, rows: number): void {
    this.parts.push(text);
    this.size += text.length;
    this.rows += rows;
  }

  /** One row of fields, each made safe for TSV. */
  row(fields: readonly string[]): void {
    let text = '';
    for (let i = 0; i < fields.length; i++) text += (i ? '\t' : '') + tsvField(fields[i], this.tally);
    this.line(text);
    this.rows++;
  }

  get full(): boolean {
    return this.size >= CHUNK;
  }

  async flush(): Promise<void> {
    if (this.parts.length === 0) return;
    const chunk = this.parts.join('');
    this.parts = [];
    this.size = 0;
    if (!this.sink.write(chunk)) await once(this.sink, 'drain');
  }

  async close(): Promise<void> {
    await this.flush();
    const done = once(this.file, 'close');
    this.sink.end();
    await done;
  }
}

/** Write rows produced by `each`, flushing whenever a chunk is full. */
async function writeTable(path: string, gzip: boolean, header: readonly string[], each: (w: TsvWriter) => Iterable<void>): Promise<number> {
  const w = TsvWriter.open(path, gzip);
  w.line(header.join('\t'));
  for (const _ of each(w)) if (w.full) await w.flush();
  await w.close();
  return w.rows;
}

export interface WriteOptions {
  gzip?: boolean;
  /** Language written on every term row (default 'en'). */
  language?: string;
}

/** A field that needs no cleaning: no tab, CR or LF, and no leading double quote. */
const PLAIN = /^[^"\t\r\n][^\t\r\n]*$/;

/** The rows of one concept as one block of lines (each ending in LF). */
function conceptBlock(c: BaseConcept, language: string, tally: FieldTally): string {
  // Hot path (4 million rows per release at the bench size): the concept's fields are cleaned
  // once, and only a value that is not plain goes through tsvField.
  const clean = (v: string) => (v === '' || PLAIN.test(v) ? v : tsvField(v, tally));
  const id = clean(c.id);
  const tail = `\t${c.status}\t${clean(c.category)}\t`;
  let block = '';
  for (const t of c.terms) block += `${id}\t${clean(t.text)}\t${t.type}${tail}${clean(t.termId)}\t${language}\n`;
  return block;
}

export async function writeRelease(path: string, release: BaseRelease, options: WriteOptions = {}): Promise<number> {
  const language = options.language ?? 'en';
  return writeTable(path, options.gzip ?? false, RELEASE_HEADER, function* (w) {
    for (const c of release.concepts) {
      w.block(conceptBlock(c, language, w.tally), c.terms.length);
      yield;
    }
  });
}

/**
 * Write two releases side by side. A concept object the new release shares with the old one
 * (the injector keeps unchanged concepts as they are) is rendered once for both files. Both
 * files keep their own concept order: the old release is walked in order, the new one with a
 * second cursor that advances past concepts it shares or that carry the same identifier, and
 * what is left of the new release is written at the end.
 */
export async function writeReleasePair(oldPath: string, newPath: string, oldRelease: BaseRelease, newRelease: BaseRelease, options: WriteOptions = {}): Promise<[number, number]> {
  const language = options.language ?? 'en';
  const gzip = options.gzip ?? false;
  const a = TsvWriter.open(oldPath, gzip);
  const b = TsvWriter.open(newPath, gzip);
  a.line(RELEASE_HEADER.join('\t'));
  b.line(RELEASE_HEADER.join('\t'));
  const olds = oldRelease.concepts;
  const news = newRelease.concepts;
  let j = 0;
  for (let i = 0; i < olds.length; i++) {
    const c = olds[i];
    const block = conceptBlock(c, language, a.tally);
    a.block(block, c.terms.length);
    if (j < news.length && news[j] === c) {
      b.block(block, c.terms.length);
      j++;
    } else if (j < news.length && news[j].id === c.id) {
      b.block(conceptBlock(news[j], language, b.tally), news[j].terms.length);
      j++;
    }
    if (a.full) await a.flush();
    if (b.full) await b.flush();
  }
  for (; j < news.length; j++) {
    b.block(conceptBlock(news[j], language, b.tally), news[j].terms.length);
    if (b.full) await b.flush();
  }
  await Promise.all([a.close(), b.close()]);
  return [a.rows, b.rows];
}

export async function writeHierarchy(path: string, parents: ReadonlyMap<string, readonly string[]>, options: WriteOptions = {}): Promise<number> {
  return writeTable(path, options.gzip ?? false, HIERARCHY_HEADER, function* (w) {
    for (const [child, ps] of parents) {
      for (const p of ps) w.row([child, p]);
      yield;
    }
  });
}

export async function writeHistory(path: string, rows: readonly GenHistoryRow[], options: WriteOptions = {}): Promise<number> {
  return writeTable(path, options.gzip ?? false, HISTORY_HEADER, function* (w) {
    for (const r of rows) {
      w.row([r.old_id, r.new_id, r.relation]);
      yield;
    }
  });
}

export const MAPPING_HEADER = ['local_code', 'local_label', 'target_id', 'relation', 'usage', 'owner'] as const;
export const TRUTH_CHANGE_HEADER = ['kind', 'from', 'to', 'note'] as const;
export const TRUTH_MAPPING_HEADER = ['local_code', 'verdict', 'successor'] as const;

export async function writeMappings(path: string, rows: readonly GenMapping[], options: WriteOptions = {}): Promise<number> {
  return writeTable(path, options.gzip ?? false, MAPPING_HEADER, function* (w) {
    for (const m of rows) {
      w.row([m.local_code, m.local_label, m.target_id, m.relation, String(m.usage), m.owner]);
      yield;
    }
  });
}

export async function writeTruthChanges(path: string, rows: readonly TruthChange[], options: WriteOptions = {}): Promise<number> {
  return writeTable(path, options.gzip ?? false, TRUTH_CHANGE_HEADER, function* (w) {
    for (const t of rows) {
      w.row([t.kind, t.from.join('|'), t.to.join('|'), t.note ?? '']);
      yield;
    }
  });
}

export async function writeTruthMappings(path: string, rows: readonly MappingTruth[], options: WriteOptions = {}): Promise<number> {
  return writeTable(path, options.gzip ?? false, TRUTH_MAPPING_HEADER, function* (w) {
    for (const t of rows) {
      w.row([t.local_code, t.verdict, t.successor]);
      yield;
    }
  });
}

/** Everything a generated dataset holds. */
export interface DatasetTables {
  old: BaseRelease;
  new: BaseRelease;
  history: readonly GenHistoryRow[];
  truth: readonly TruthChange[];
  mappings: readonly GenMapping[];
  mappingTruth: readonly MappingTruth[];
}

/** File names of a dataset, without the `.gz` suffix. */
export const DATASET_FILES = {
  old: 'old.tsv',
  new: 'new.tsv',
  oldHierarchy: 'old-hierarchy.tsv',
  newHierarchy: 'new-hierarchy.tsv',
  history: 'history.tsv',
  mappings: 'mappings.tsv',
  truthChanges: 'truth-changes.tsv',
  truthMappings: 'truth-mappings.tsv',
} as const;

export type DatasetFile = keyof typeof DATASET_FILES;

/** Write every table of a dataset into `dir` (created if needed); returns the paths and row counts. */
export async function writeDataset(dir: string, data: DatasetTables, options: WriteOptions = {}): Promise<{ paths: Record<DatasetFile, string>; rows: Record<DatasetFile, number> }> {
  await fsp.mkdir(dir, { recursive: true });
  const suffix = options.gzip ? '.gz' : '';
  const paths = Object.fromEntries(Object.entries(DATASET_FILES).map(([k, v]) => [k, join(dir, v + suffix)])) as Record<DatasetFile, string>;
  const rows = {} as Record<DatasetFile, number>;
  [rows.old, rows.new] = await writeReleasePair(paths.old, paths.new, data.old, data.new, options);
  rows.oldHierarchy = await writeHierarchy(paths.oldHierarchy, data.old.parents, options);
  rows.newHierarchy = await writeHierarchy(paths.newHierarchy, data.new.parents, options);
  rows.history = await writeHistory(paths.history, data.history, options);
  rows.mappings = await writeMappings(paths.mappings, data.mappings, options);
  rows.truthChanges = await writeTruthChanges(paths.truthChanges, data.truth, options);
  rows.truthMappings = await writeTruthMappings(paths.truthMappings, data.mappingTruth, options);
  return { paths, rows };
}
