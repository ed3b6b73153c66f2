/**
 * `diff`, `check` and `demo`: run the pipeline, render the report, write it, set the exit code.
 * Rendering is chosen here and done by src/render/; this file holds no report logic.
 */
import { closeSync, openSync, writeFileSync, writeSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { runCheck, runDiff, type CheckOptions, type DiffOptions } from '../pipeline.js';
import { parseColumnsOption } from '../load/columns.js';
import { RELEASE_COLUMNS } from '../load/loadRelease.js';
import { renderReport, type RenderFormat } from '../render/index.js';
import { jsonChunks } from '../render/json.js';
import type { Report } from '../report/types.js';
import { VERDICTS, type Verdict } from '../rescore/types.js';
import { UsageError } from '../errors.js';
import { exitCodeFor, type ExitCode } from './exitCode.js';
import { parseFailOn } from '../rank/failOn.js';
import { writeAtomic } from '../state/atomicWrite.js';
import { DEFAULT_STATE_DIR } from '../state/stateStore.js';
import type { Progress } from './progress.js';
import { afterInputsRead } from './heap.js';

export interface ReportFlags {
  oldHierarchy?: string;
  newHierarchy?: string;
  history?: string;
  format?: string;
  out?: string;
  columns?: string;
  oldLabel?: string;
  newLabel?: string;
  now?: string;
  limit?: string;
  verdict?: string;
  color?: boolean;
  mappings?: string;
  failOn?: string;
  summaryJson?: string;
  /** --state DIR (a string), --no-state (false), or neither (undefined: the command's default). */
  state?: string | false;
}

const DIFF_FORMATS: RenderFormat[] = ['text', 'json', 'md'];
const CHECK_FORMATS: RenderFormat[] = ['text', 'json', 'md', 'csv', 'html'];

function parseFormat(value: string | undefined, allowed: RenderFormat[]): RenderFormat {
  const f = (value ?? 'text') as RenderFormat;
  if (!allowed.includes(f)) throw new UsageError(`--format must be one of ${allowed.join(', ')}; got "${value}"`);
  return f;
}

export function parseNow(value: string | undefined): string | undefined {
  if (value === undefined) return undefined;
  const t = Date.parse(value);
  if (Number.isNaN(t)) throw new UsageError(`--now must be an ISO date or time; got "${value}"`, 'e.g. --now 2026-12-01T09:00:00Z');
  return new Date(t).toISOString();
}

function parseLimit(value: string | undefined): number | undefined {
  if (value === undefined) return undefined;
  const n = Number(value);
  if (!Number.isInteger(n) || n < 0) throw new UsageError(`--limit must be a whole number; got "${value}"`);
  return n;
}

function parseVerdicts(value: string | undefined): Verdict[] | undefined {
  if (value === undefined) return undefined;
  const list = value.split(',').map((v) => v.trim()).filter(Boolean);
  for (const v of list) if (!(VERDICTS as readonly string[]).includes(v)) throw new UsageError(`--verdict: unknown verdict "${v}"`, `use a comma-separated list of: ${VERDICTS.join(', ')}`);
  return list as Verdict[];
}

function diffOptions(oldPath: string, newPath: string, f: ReportFlags): DiffOptions {
  return {
    old: oldPath,
    new: newPath,
    oldHierarchy: f.oldHierarchy,
    newHierarchy: f.newHierarchy,
    history: f.history,
    oldLabel: f.oldLabel,
    newLabel: f.newLabel,
    columns: parseColumnsOption(f.columns, RELEASE_COLUMNS.map((c) => c.name)),
    now: parseNow(f.now),
  };
}

export interface Io {
  out: (s: string) => void;
  /** Is standard output a terminal (for colour)? */
  isTTY: boolean;
  /** Progress on standard error for long runs (cli/progress.ts); none when absent. */
  progress?: Progress;
}

function useColor(f: ReportFlags, io: Io): boolean {
  if (f.color === false || process.env.NO_COLOR) return false;
  return io.isTTY && !f.out;
}

function emit(text: string, f: ReportFlags, io: Io): void {
  if (f.out) writeFileSync(f.out, text);
  else io.out(text);
}

/** Pieces of text (each ending a line) written in batches of about 1 MiB: a big JSON report is never one string. */
function emitPieces(pieces: Iterable<string>, f: ReportFlags, io: Io): void {
  const fd = f.out ? openSync(f.out, 'w') : undefined;
  try {
    let batch: string[] = [];
    let size = 0;
    const flush = () => {
      if (batch.length === 0) return;
      const text = batch.join('');
      if (fd !== undefined) writeSync(fd, text);
      else io.out(text);
      batch = [];
      size = 0;
    };
    for (const piece of pieces) {
      batch.push(piece);
      size += piece.length;
      if (size >= 1 << 20) flush();
    }
    flush();
  } finally {
    if (fd !== undefined) closeSync(fd);
  }
}

/** The report in `format`: JSON in pieces, the other forms as one text. */
function emitReport(format: RenderFormat, report: Report, f: ReportFlags, io: Io): void {
  if (format === 'json') emitPieces(jsonChunks(report), f, io);
  else emit(renderReport(format, report, { color: useColor(f, io), limit: parseLimit(f.limit), verdicts: parseVerdicts(f.verdict) }), f, io);
}

export async function runDiffCommand(oldPath: string, newPath: string, f: ReportFlags, io: Io): Promise<ExitCode> {
  const format = parseFormat(f.format, DIFF_FORMATS);
  const { report } = await runDiff({ ...diffOptions(oldPath, newPath, f), onProgress: io.progress?.file, onLoaded: afterInputsRead });
  io.progress?.phase('writing the report');
  emitReport(format, report, f, io);
  return exitCodeFor({});
}

export async function runCheckCommand(oldPath: string, newPath: string, f: ReportFlags, io: Io): Promise<ExitCode> {
  if (!f.mappings) throw new UsageError('--mappings FILE is required', 'give the mapping set to re-score (CSV, TSV, SSSOM TSV or FHIR ConceptMap JSON)');
  const format = parseFormat(f.format, CHECK_FORMATS);
  const failOn = parseFailOn(f.failOn);
  // check keeps its history in .termdrift/ unless told otherwise (docs/STATE.md).
  const state = f.state === false ? undefined : (f.state ?? DEFAULT_STATE_DIR);
  const options: CheckOptions = { ...diffOptions(oldPath, newPath, f), mappings: f.mappings, failOn, state };
  const { report } = await runCheck({ ...options, onProgress: io.progress?.file, onLoaded: afterInputsRead });
  io.progress?.phase('writing the report');
  emitReport(format, report, f, io);
  if (f.summaryJson) {
    const summary = {
      tool: report.tool,
      releases: { old: report.releases.old.label, new: report.releases.new.label },
      verdicts: report.verdict_summary,
      changes: report.summary,
      rejected_rows: report.rejected_rows.length,
      settled: report.mappings.filter((m) => m.settled).length,
      fail_on: report.fail_on ?? null,
    };
    writeAtomic(f.summaryJson, JSON.stringify(summary, null, 2) + '\n');
  }
  return exitCodeFor({ failOnReached: report.fail_on?.reached ?? false });
}

/** The demo scenario shipped in demo-data/ (invented): release r1 → r2 with the hospital's mappings. */
export function demoPaths() {
  const dir = fileURLToPath(new URL('../../demo-data/', import.meta.url));
  return {
    old: `${dir}release-r1.tsv`,
    new: `${dir}release-r2.tsv`,
    oldHierarchy: `${dir}hierarchy-r1.tsv`,
    newHierarchy: `${dir}hierarchy-r2.tsv`,
    history: `${dir}history-r2.tsv`,
    mappings: `${dir}mappings.tsv`,
  };
}

export async function runDemoCommand(f: ReportFlags, io: Io): Promise<ExitCode> {
  const p = demoPaths();
  // The demo writes no state unless asked with --state DIR.
  const state = typeof f.state === 'string' ? f.state : false;
  return runCheckCommand(p.old, p.new, { ...f, oldHierarchy: p.oldHierarchy, newHierarchy: p.newHierarchy, history: p.history, mappings: p.mappings, state }, io);
}
