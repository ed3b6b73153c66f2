/**
 * `apply WORKLIST --mappings M --out M2`: apply a reviewer's decisions to a mapping set.
 *
 * Order of work, so that a bad worklist writes nothing: read the mapping set, the worklist and
 * the new release; check every decision (src/apply/applyDecisions.ts); build the output text and
 * check the audit log can be appended to; only then write M2, the audit log and the state, each
 * atomically.
 *
 * The new release (targets must be active concepts of it) is `--release-file NEW`, or else the
 * release a recorded check run read whose SHA-256 the worklist's `new_sha256` column gives.
 */
import { existsSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import { InputError, UsageError } from '../errors.js';
import { loadMappings, loadRelease } from '../load/index.js';
import type { MappingSet, Release } from '../load/types.js';
import { readWorklist, type Worklist } from '../apply/readWorklist.js';
import { applyDecisions, type ApplyResult } from '../apply/applyDecisions.js';
import { DecisionError } from '../apply/decisionError.js';
import { readAuditLog, writeAuditLog } from '../apply/auditLog.js';
import { readRawTable } from '../exchange/rawTable.js';
import { OUTPUT_FORMATS, writeMappingSet, type CuriePrefix, type OutputFormat } from '../exchange/writeMappingSet.js';
import { writeAtomic } from '../state/atomicWrite.js';
import { DEFAULT_STATE_DIR, StateStore, type DecisionRecord } from '../state/stateStore.js';
import { CAUTION } from '../report/caution.js';
import { EXIT, type ExitCode } from './exitCode.js';

export interface ApplyFlags {
  mappings?: string;
  out?: string;
  audit?: string;
  now?: string;
  release?: string;
  releaseFile?: string;
  outFormat?: string;
  state?: string | false;
  setId?: string;
  license?: string;
  setVersion?: string;
  localPrefix?: string;
  targetPrefix?: string;
  localSystem?: string;
  targetSystem?: string;
}

export interface ApplyIo {
  out: (s: string) => void;
  err: (s: string) => void;
}

/** --now: an ISO time, or the word `now` for the clock (the only way apply reads it). */
export function parseApplyNow(value: string | undefined): string | undefined {
  if (value === undefined) return undefined;
  if (value === 'now') return new Date().toISOString();
  const t = Date.parse(value);
  if (Number.isNaN(t)) throw new UsageError(`--now must be an ISO date or time, or "now"; got "${value}"`, 'e.g. --now 2026-12-01T09:00:00Z');
  return new Date(t).toISOString();
}

function parsePrefix(flag: string, value: string | undefined): CuriePrefix | undefined {
  if (value === undefined) return undefined;
  const eq = value.indexOf('=');
  const prefix = value.slice(0, eq).trim();
  const iri = value.slice(eq + 1).trim();
  if (eq <= 0 || !/^[A-Za-z_][A-Za-z0-9_.-]*$/.test(prefix) || !/^[a-z][a-z0-9+.-]*:\S+$/i.test(iri)) {
    throw new UsageError(`${flag} must be PREFIX=IRI; got "${value}"`, `e.g. ${flag} LOCAL=https://example.org/local-codes/`);
  }
  return { prefix, iri };
}

/** The output format: --out-format, else by the name of --out, else the input's own format. */
export function outputFormat(out: string, given: string | undefined, input: MappingSet['format']): OutputFormat {
  if (given !== undefined) {
    if (!(OUTPUT_FORMATS as readonly string[]).includes(given)) throw new UsageError(`--out-format must be one of ${OUTPUT_FORMATS.join(', ')}; got "${given}"`);
    return given as OutputFormat;
  }
  const name = out.toLowerCase();
  if (name.endsWith('.json')) return 'fhir';
  if (name.endsWith('.sssom.tsv')) return 'sssom';
  if (name.endsWith('.csv')) return 'csv';
  if (name.endsWith('.tsv') && input === 'csv') return 'tsv';
  return input;
}

/** Check, before anything is written, that a file can be written where it is asked for. */
function checkWritable(flag: string, path: string): void {
  const dir = dirname(path);
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new InputError('file_not_found', `${flag} ${path}: the folder ${dir} does not exist`, { location: { file: path }, fix: `create the folder first, or give ${flag} a path in an existing folder` });
  }
}

/** Write a file; a file-system error becomes a message with the fix. */
function writeFile(flag: string, path: string, write: () => void): void {
  try {
    write();
  } catch (err) {
    const e = err as NodeJS.ErrnoException;
    if (!e.code) throw err;
    throw new InputError('file_unreadable', `cannot write ${flag} ${path}: ${e.code} (${e.message})`, { location: { file: path }, fix: 'check the folder and its permissions' });
  }
}

/** The state folder apply records decisions in: --state DIR, none with --no-state, else .termdrift/ when it exists. */
function stateDir(f: ApplyFlags): string | undefined {
  if (f.state === false) return undefined;
  if (typeof f.state === 'string') return f.state;
  return existsSync(DEFAULT_STATE_DIR) ? DEFAULT_STATE_DIR : undefined;
}

/** The worklist's release: the new_sha256 and new_release of its first decided row (or first row). */
function worklistRelease(w: Worklist): { sha256: string; label: string } {
  const row = w.rows.find((r) => r.values.decision && r.values.new_sha256) ?? w.rows.find((r) => r.values.new_sha256);
  return { sha256: row?.values.new_sha256 ?? '', label: row?.values.new_release ?? '' };
}

async function findRelease(f: ApplyFlags, w: Worklist, store: StateStore | undefined, label: string | undefined): Promise<Release> {
  const wanted = worklistRelease(w);
  if (f.releaseFile) return loadRelease(f.releaseFile, { label: label ?? (wanted.label || undefined) });
  if (!wanted.sha256) {
    throw new UsageError('apply needs the new release to check the targets, and the worklist does not say which it is (no new_sha256 column)', 'give --release-file NEW, the new release the worklist was made from');
  }
  const runs = store?.runs ?? [];
  for (let i = runs.length - 1; i >= 0; i--) {
    if (runs[i].new.sha256 !== wanted.sha256) continue;
    const run = store!.loadRun(runs[i]);
    const path = run.releases.new.path;
    if (existsSync(path)) return loadRelease(path, { label: label ?? run.releases.new.label });
  }
  throw new UsageError(
    `apply needs the new release the worklist was made from (${wanted.label || 'new_release'}, SHA-256 ${wanted.sha256.slice(0, 12)}…), and ${store ? `no run recorded in ${store.dir} read it from a file that is still there` : 'there is no state folder that recorded it'}`,
    'give --release-file NEW',
  );
}

export async function runApplyCommand(worklistPath: string, f: ApplyFlags, io: ApplyIo): Promise<ExitCode> {
  if (!f.mappings) throw new UsageError('--mappings FILE is required', 'give the mapping set the worklist was made from');
  if (!f.out) throw new UsageError('--out FILE is required', 'give the file to write the updated mapping set to (- for standard output)');
  if (f.audit && f.audit === f.out) throw new UsageError('--audit and --out name the same file', 'give the audit log its own file');
  if (f.out === worklistPath) throw new UsageError('--out names the worklist', 'write the updated mappings to another file');
  const now = parseApplyNow(f.now);
  const localPrefix = parsePrefix('--local-prefix', f.localPrefix);
  const targetPrefix = parsePrefix('--target-prefix', f.targetPrefix);
  const dir = stateDir(f);
  const store = dir !== undefined ? StateStore.open(dir) : undefined;

  const [mappings, worklist] = await Promise.all([loadMappings(f.mappings), readWorklist(worklistPath)]);
  const rejected = mappings.diagnostics.filter((d) => d.rejected);
  if (rejected.length) {
    throw new DecisionError(rejected.map((d) => ({ file: d.file, line: d.line, column: d.column, code: 'unreadable_row' as const, message: `apply cannot carry this mapping row over: ${d.message}`, fix: `${d.fix} (apply writes every row of the set back, so the set must load without rejected rows; see termdrift validate)` })));
  }
  const format = outputFormat(f.out, f.outFormat, mappings.format);
  const release = await findRelease(f, worklist, store, f.release);
  const releaseLabel = f.release ?? (worklistRelease(worklist).label || release.label);

  const result: ApplyResult = applyDecisions({ mappings, worklist, release, releaseLabel, now });
  const raw = mappings.format === 'fhir' ? undefined : await readRawTable(mappings.path);
  const text = writeMappingSet(mappings, result.rows, {
    format,
    release: releaseLabel,
    setVersion: f.setVersion,
    mappingSetId: f.setId,
    license: f.license,
    localPrefix,
    targetPrefix,
    localSystem: f.localSystem,
    targetSystem: f.targetSystem,
    date: now,
    raw,
  });
  const existingAudit = f.audit ? readAuditLog(f.audit) : undefined;
  if (f.out !== '-') checkWritable('--out', f.out);
  if (f.audit) checkWritable('--audit', f.audit);

  // Everything is checked: write.
  if (f.out === '-') io.out(text);
  else writeFile('--out', f.out, () => writeAtomic(f.out!, text, 0o644));
  if (f.audit) writeFile('--audit', f.audit, () => writeAuditLog(f.audit!, existingAudit, result.audit));
  if (store && result.audit.length) {
    const records: DecisionRecord[] = result.audit.map((a) => ({
      local_code: a.local_code,
      old_target: a.old_target,
      new_target: a.new_target,
      decision: a.decision,
      reviewer: a.reviewer,
      note: a.note,
      release: a.release,
      release_sha256: a.release_sha256,
      time: a.time,
      worklist_sha256: worklist.sha256,
    }));
    store.recordDecisions(records);
  }

  const c = result.counts;
  const say = f.out === '-' ? io.err : io.out;
  const decided = c.accept + c.keep + c.remap + c.retire;
  const lines = [
    `Applied ${decided} decision${decided === 1 ? '' : 's'} from ${worklistPath} to ${mappings.path} → ${f.out === '-' ? 'standard output' : f.out} (${format}, release ${releaseLabel})`,
    `  accept ${c.accept}, keep ${c.keep}, remap ${c.remap}, retire ${c.retire}; ${c.undecided} row${c.undecided === 1 ? '' : 's'} undecided, left as they are`,
    `  ${mappings.mappings.length} mappings read, ${c.written} written; ${c.not_in_worklist} not in the worklist, left as they are`,
    f.audit ? `  audit log: ${f.audit} (${result.audit.length} row${result.audit.length === 1 ? '' : 's'} added)` : '  no audit log written (--audit FILE writes one)',
    store ? `  state: ${store.dir} (${result.audit.length} decision${result.audit.length === 1 ? '' : 's'} recorded)` : '  no state folder: the decisions are not remembered by the next check (--state DIR)',
    `Caution: ${CAUTION}`,
  ];
  say(lines.join('\n'));
  return EXIT.ok;
}

