/**
 * The state folder: a compact record of every `check` run and of the decisions `apply` applied,
 * so that later runs can show score trends and leave decided mappings alone. Layout and format:
 * docs/STATE.md.
 *
 *   DIR/index.json                   the commit point: runs in order, the decisions file
 *   DIR/runs/NNNN-<sha8>.json        one run: releases, input hashes, one row per mapping
 *   DIR/decisions-<sha8>.json        every decision applied, latest last
 *
 * Files other than index.json are never overwritten: a new run or a new decision list goes to a
 * new file named after its content's hash, and index.json is then replaced atomically
 * (temporary file, fsync, rename; atomicWrite.ts). A crash at any moment leaves the previous
 * index, which names only complete files whose SHA-256 it holds; files no index names are removed
 * by the next write. The folder is created 0700 and files 0600: runs name local codes and file
 * paths, which can be confidential. One writer at a time: two runs writing the same folder at the
 * same moment can lose one run's record, never corrupt the state.
 */
import { chmodSync, existsSync, mkdirSync, readdirSync, readFileSync, statSync, unlinkSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { InputError } from '../errors.js';
import type { CheckReport } from '../report/types.js';
import type { Verdict } from '../rescore/types.js';
import { writeAtomic, type AtomicWriteHooks } from './atomicWrite.js';

export const STATE_FORMAT = 'termdrift-state';
export const RUN_FORMAT = 'termdrift-run';
export const DECISIONS_FORMAT = 'termdrift-decisions';
export const STATE_VERSION = 1;
/** The default state folder, relative to the working folder. */
export const DEFAULT_STATE_DIR = '.termdrift';

/** Columns of a run's mapping rows, in order. */
export const RUN_COLUMNS = ['local_code', 'local_label', 'target_id', 'verdict', 'score_old', 'score_new', 'impact', 'settled'] as const;
export type RunRow = [string, string, string, Verdict, number | null, number | null, number, string];

export interface RunRelease {
  label: string;
  sha256: string;
  path: string;
}

/** One recorded `check` run (runs/NNNN-<sha8>.json). */
export interface RunRecord {
  format: typeof RUN_FORMAT;
  version: number;
  tool: { name: string; version: string };
  releases: { old: RunRelease; new: RunRelease };
  /** Every input with its SHA-256, as in the report. */
  inputs: { role: string; path: string; sha256: string }[];
  /** The report's --now time, when given. */
  generated_at?: string;
  columns: readonly string[];
  /** One row per mapping, in the mapping set's order; fields as RUN_COLUMNS. */
  rows: RunRow[];
}

/** A run as the index lists it. */
export interface RunEntry {
  /** 1, 2, 3 … in the order the runs were first recorded. */
  id: number;
  file: string;
  sha256: string;
  old: { label: string; sha256: string };
  new: { label: string; sha256: string };
  mappings_sha256: string;
  mappings: number;
  generated_at?: string;
}

/** A decision applied by `apply`. */
export interface DecisionRecord {
  local_code: string;
  old_target: string;
  /** '' for a retired mapping. */
  new_target: string;
  decision: 'accept' | 'keep' | 'remap' | 'retire';
  reviewer: string;
  note: string;
  /** Label and SHA-256 of the release the decision was made for (the worklist's new release). */
  release: string;
  release_sha256: string;
  /** ISO time from apply --now or the worklist; '' when none was given. */
  time: string;
  worklist_sha256: string;
}

export interface StateIndex {
  format: typeof STATE_FORMAT;
  version: number;
  runs: RunEntry[];
  decisions: { file: string; sha256: string; count: number } | null;
}

const sha256 = (text: string) => createHash('sha256').update(text, 'utf8').digest('hex');

function corrupt(file: string, what: string): InputError {
  return new InputError('state_corrupt', `the state file is damaged or not termdrift's: ${what}`, {
    location: { file },
    fix: 'restore the state folder from a backup, or give another --state folder (or --no-state); the reports do not depend on it',
  });
}

function parseJsonFile(path: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch {
    throw corrupt(path, 'it cannot be read');
  }
  try {
    return JSON.parse(text);
  } catch (err) {
    throw corrupt(path, (err as Error).message);
  }
}

/** A run's JSON: the header fields on their own lines, then one mapping row per line. */
export function serializeRun(run: RunRecord): string {
  const { rows, ...head } = run;
  const headText = JSON.stringify(head, null, 2);
  const body = rows.map((r) => `    ${JSON.stringify(r)}`).join(',\n');
  return `${headText.slice(0, -2)},\n  "rows": [\n${body}${rows.length ? '\n' : ''}  ]\n}\n`;
}

/** The run record of a check report. */
export function runFromReport(report: CheckReport): RunRecord {
  const rows = [...report.mappings]
    .sort((a, b) => a.line - b.line)
    .map((m): RunRow => [m.local_code, m.local_label, m.target_id, m.verdict, m.score_old, m.score_new, m.impact, m.settled?.decision ?? '']);
  const run: RunRecord = {
    format: RUN_FORMAT,
    version: STATE_VERSION,
    tool: report.tool,
    releases: {
      old: { label: report.releases.old.label, sha256: report.releases.old.sha256, path: report.releases.old.path },
      new: { label: report.releases.new.label, sha256: report.releases.new.sha256, path: report.releases.new.path },
    },
    inputs: report.inputs.map((i) => ({ role: i.role, path: i.path, sha256: i.sha256 })),
    columns: RUN_COLUMNS,
    rows,
  };
  if (report.generated_at) run.generated_at = report.generated_at;
  return run;
}

export interface StateOptions {
  /** For the crash tests: passed to every atomic write. */
  hooks?: AtomicWriteHooks;
}

export class StateStore {
  readonly dir: string;
  private index: StateIndex;
  private readonly hooks: AtomicWriteHooks;

  private constructor(dir: string, index: StateIndex, options: StateOptions) {
    this.dir = dir;
    this.index = index;
    this.hooks = options.hooks ?? {};
  }

  /** Open a state folder; a folder (or index) that does not exist yet is an empty state. Nothing is written. */
  static open(dir: string, options: StateOptions = {}): StateStore {
    const indexPath = join(dir, 'index.json');
    if (existsSync(dir) && !statSync(dir).isDirectory()) {
      throw new InputError('not_a_file', `the state path is not a folder: ${dir}`, { location: { file: dir }, fix: 'give --state a folder (it is created when missing)' });
    }
    if (!existsSync(indexPath)) return new StateStore(dir, { format: STATE_FORMAT, version: STATE_VERSION, runs: [], decisions: null }, options);
    const raw = parseJsonFile(indexPath) as Partial<StateIndex>;
    if (raw === null || typeof raw !== 'object' || raw.format !== STATE_FORMAT || !Array.isArray(raw.runs)) throw corrupt(indexPath, `"format" is not "${STATE_FORMAT}"`);
    if (raw.version !== STATE_VERSION) {
      throw new InputError('state_corrupt', `the state was written by a termdrift with state format ${String(raw.version)}; this one reads ${STATE_VERSION}`, { location: { file: indexPath }, fix: 'use the termdrift that wrote it, or another --state folder' });
    }
    return new StateStore(dir, raw as StateIndex, options);
  }

  get runs(): readonly RunEntry[] {
    return this.index.runs;
  }

  /** Read one run, checking its SHA-256 against the index. */
  loadRun(entry: RunEntry): RunRecord {
    const path = join(this.dir, entry.file);
    let text: string;
    try {
      text = readFileSync(path, 'utf8');
    } catch {
      throw corrupt(path, 'the index names this run file, and it is missing');
    }
    if (sha256(text) !== entry.sha256) throw corrupt(path, 'its SHA-256 is not the one the index holds');
    const run = JSON.parse(text) as RunRecord;
    if (run.format !== RUN_FORMAT) throw corrupt(path, `"format" is not "${RUN_FORMAT}"`);
    return run;
  }

  loadRuns(): RunRecord[] {
    return this.index.runs.map((e) => this.loadRun(e));
  }

  /** Every decision recorded, oldest first. */
  decisions(): DecisionRecord[] {
    const d = this.index.decisions;
    if (!d) return [];
    const path = join(this.dir, d.file);
    let text: string;
    try {
      text = readFileSync(path, 'utf8');
    } catch {
      throw corrupt(path, 'the index names this decisions file, and it is missing');
    }
    if (sha256(text) !== d.sha256) throw corrupt(path, 'its SHA-256 is not the one the index holds');
    const doc = JSON.parse(text) as { format: string; decisions: DecisionRecord[] };
    if (doc.format !== DECISIONS_FORMAT || !Array.isArray(doc.decisions)) throw corrupt(path, `"format" is not "${DECISIONS_FORMAT}"`);
    return doc.decisions;
  }

  /**
   * Record a run. A run with the same old release, new release and mapping set as a recorded one
   * replaces it in place (same inputs, same findings); any other run is added at the end.
   */
  recordRun(run: RunRecord): RunEntry {
    return this.writing(() => this.recordRunNow(run));
  }

  /** Run a write; a file-system error (no permission, disk full) becomes an error that says what to do. */
  private writing<T>(fn: () => T): T {
    try {
      return fn();
    } catch (err) {
      const e = err as NodeJS.ErrnoException;
      if (!e.code || err instanceof InputError) throw err;
      throw new InputError('file_unreadable', `cannot write the state folder ${this.dir}: ${e.code} (${e.message})`, {
        location: { file: this.dir },
        fix: 'give --state a folder you can write to, or --no-state to record nothing; the state as it was is intact',
      });
    }
  }

  private recordRunNow(run: RunRecord): RunEntry {
    this.ensureDir();
    const text = serializeRun(run);
    const hash = sha256(text);
    const mappingsSha = run.inputs.find((i) => i.role === 'mappings')?.sha256 ?? '';
    const at = this.index.runs.findIndex((e) => e.old.sha256 === run.releases.old.sha256 && e.new.sha256 === run.releases.new.sha256 && e.mappings_sha256 === mappingsSha);
    const id = at >= 0 ? this.index.runs[at].id : this.index.runs.reduce((n, e) => Math.max(n, e.id), 0) + 1;
    const file = `runs/${String(id).padStart(4, '0')}-${hash.slice(0, 8)}.json`;
    writeAtomic(join(this.dir, file), text, 0o600, this.hooks);
    const entry: RunEntry = {
      id,
      file,
      sha256: hash,
      old: { label: run.releases.old.label, sha256: run.releases.old.sha256 },
      new: { label: run.releases.new.label, sha256: run.releases.new.sha256 },
      mappings_sha256: mappingsSha,
      mappings: run.rows.length,
    };
    if (run.generated_at) entry.generated_at = run.generated_at;
    const runs = [...this.index.runs];
    if (at >= 0) runs[at] = entry;
    else runs.push(entry);
    this.commit({ ...this.index, runs });
    return entry;
  }

  /**
   * Add decisions. A decision for the same local code, old target and release as a recorded one
   * replaces it (applying the same worklist twice records it once).
   */
  recordDecisions(list: DecisionRecord[]): void {
    this.writing(() => this.recordDecisionsNow(list));
  }

  private recordDecisionsNow(list: DecisionRecord[]): void {
    this.ensureDir();
    const key = (d: DecisionRecord) => `${d.local_code}\u0001${d.old_target}\u0001${d.release_sha256}`;
    const incoming = new Set(list.map(key));
    const all = [...this.decisions().filter((d) => !incoming.has(key(d))), ...list];
    const body = all.map((d) => `    ${JSON.stringify(d)}`).join(',\n');
    const text = `{\n  "format": "${DECISIONS_FORMAT}",\n  "version": ${STATE_VERSION},\n  "decisions": [\n${body}${all.length ? '\n' : ''}  ]\n}\n`;
    const hash = sha256(text);
    const file = `decisions-${hash.slice(0, 8)}.json`;
    writeAtomic(join(this.dir, file), text, 0o600, this.hooks);
    this.commit({ ...this.index, decisions: { file, sha256: hash, count: all.length } });
  }

  private ensureDir(): void {
    for (const d of [this.dir, join(this.dir, 'runs')]) {
      if (!existsSync(d)) {
        mkdirSync(d, { recursive: true, mode: 0o700 });
        chmodSync(d, 0o700);
      }
    }
  }

  /** Replace index.json atomically, then remove the files it no longer names. */
  private commit(next: StateIndex): void {
    writeAtomic(join(this.dir, 'index.json'), JSON.stringify(next, null, 2) + '\n', 0o600, this.hooks);
    this.index = next;
    this.sweep();
  }

  /** Remove run and decision files the index does not name, and temporary files of writers that are gone. */
  private sweep(): void {
    const named = new Set([...this.index.runs.map((e) => e.file), ...(this.index.decisions ? [this.index.decisions.file] : [])]);
    const remove = (path: string) => {
      try { unlinkSync(path); } catch { /* already gone */ }
    };
    const stale = (name: string) => {
      const m = /\.(\d+)\.\d+\.tmp$/.exec(name);
      if (!m) return false;
      const pid = Number(m[1]);
      if (pid === process.pid) return false;
      try {
        process.kill(pid, 0);
        return false;
      } catch (err) {
        return (err as NodeJS.ErrnoException).code === 'ESRCH';
      }
    };
    for (const name of readdirSync(join(this.dir, 'runs'))) {
      if ((name.endsWith('.json') && !named.has(`runs/${name}`)) || stale(name)) remove(join(this.dir, 'runs', name));
    }
    for (const name of readdirSync(this.dir)) {
      if ((/^decisions-[0-9a-f]{8}\.json$/.test(name) && !named.has(name)) || stale(name)) remove(join(this.dir, name));
    }
  }
}
