/**
 * applyDecisions and readWorklist on small hand-built inputs: what each decision does, and every
 * kind of bad decision, each reported with file, line, column and a stable code, all at once.
 */
import { describe, expect, it } from 'vitest';
import { loadMappings, loadRelease } from '../../src/load/index.js';
import { readWorklist } from '../../src/apply/readWorklist.js';
import { applyDecisions, type ApplyInput } from '../../src/apply/applyDecisions.js';
import { DecisionError, DECISION_PROBLEMS } from '../../src/apply/decisionError.js';
import { appendAudit, AUDIT_HEADER } from '../../src/apply/auditLog.js';
import { csvField, WORKLIST_COLUMNS } from '../../src/render/csv.js';
import { TermdriftError } from '../../src/errors.js';
import { releaseTsv } from '../helpers/releases.js';
import { tempDir, writeFile } from '../helpers/files.js';

const RELEASE = `
C1 disorder: Heart attack* | Myocardial infarction
C2 disorder: Chest pain*
C3 disorder: Angina pectoris* | Angina
C4 disorder (inactive): Old angina*
C5 finding: Heartburn*
`;

const MAPPINGS = 'local_code\tlocal_label\ttarget_id\tusage\nL1\tHeart attack\tC9\t10\nL2\tAngina\tC2\t5\nL3\tHeartburn\tC5\t1\nL4\tChest pain\tC2\t2\nL5\tMI\tC1\t1\nL5\tMI\tC3\t1\n';

type Row = Partial<Record<(typeof WORKLIST_COLUMNS)[number] | 'decided_at', string>>;

async function setup(rows: Row[], options: { extraColumns?: string[]; releaseSha?: string } = {}) {
  const dir = tempDir();
  const release = await loadRelease(writeFile(dir, 'new.tsv', releaseTsv(RELEASE)), { label: 'vNew' });
  const mappings = await loadMappings(writeFile(dir, 'm.tsv', MAPPINGS));
  const columns = [...WORKLIST_COLUMNS, ...(options.extraColumns ?? [])];
  const lines = [columns.join(',')];
  for (const r of rows) lines.push(columns.map((c) => csvField((r as Record<string, string>)[c] ?? (c === 'new_sha256' ? options.releaseSha ?? release.sha256 : c === 'new_release' ? 'vNew' : ''))).join(','));
  const worklist = await readWorklist(writeFile(dir, 'worklist.csv', lines.join('\r\n') + '\r\n'));
  const input: ApplyInput = { mappings, worklist, release, releaseLabel: 'vNew', now: '2026-03-01T10:00:00.000Z' };
  return { input, worklist, release, mappings };
}

function problemsOf(input: ApplyInput): DecisionError['problems'] {
  try {
    applyDecisions(input);
  } catch (e) {
    if (e instanceof DecisionError) return e.problems;
    throw e;
  }
  return [];
}

describe('applyDecisions', () => {
  it('accept takes the proposed target, remap the new target, keep leaves it, retire drops it; empty is undecided', async () => {
    const { input } = await setup([
      { local_code: 'L1', target_id: 'C9', proposed_target: 'C1', decision: 'accept', reviewer: 'A' },
      { local_code: 'L2', target_id: 'C2', proposed_target: 'C2', decision: ' Remap ', new_target: 'C3', reviewer: 'B', note: 'moved synonym' },
      { local_code: 'L3', target_id: 'C5', decision: 'keep', reviewer: 'A' },
      { local_code: 'L4', target_id: 'C2', decision: 'retire', reviewer: 'A' },
      { local_code: 'L5', target_id: 'C1', decision: '' },
    ]);
    const r = applyDecisions(input);
    expect(r.rows.map((x) => [x.mapping.localCode, x.targetId, x.targetChanged, x.targetLabel, x.review?.decision ?? ''])).toEqual([
      ['L1', 'C1', true, 'Heart attack', 'accept'],
      ['L2', 'C3', true, 'Angina pectoris', 'remap'],
      ['L3', 'C5', false, '', 'keep'],
      ['L5', 'C1', false, '', ''],
      ['L5', 'C3', false, '', ''],
    ]);
    expect(r.counts).toEqual({ rows: 5, accept: 1, keep: 1, remap: 1, retire: 1, undecided: 1, not_in_worklist: 1, written: 5 });
    expect(r.audit.map((a) => [a.local_code, a.old_target, a.new_target, a.decision, a.reviewer, a.note, a.release, a.time])).toEqual([
      ['L1', 'C9', 'C1', 'accept', 'A', '', 'vNew', '2026-03-01T10:00:00.000Z'],
      ['L2', 'C2', 'C3', 'remap', 'B', 'moved synonym', 'vNew', '2026-03-01T10:00:00.000Z'],
      ['L3', 'C5', 'C5', 'keep', 'A', '', 'vNew', '2026-03-01T10:00:00.000Z'],
      ['L4', 'C2', '', 'retire', 'A', '', 'vNew', '2026-03-01T10:00:00.000Z'],
    ]);
  });

  it('takes the time from decided_at when --now is not given, and leaves it empty otherwise (no clock)', async () => {
    const { input } = await setup([
      { local_code: 'L3', target_id: 'C5', decision: 'keep', decided_at: '2026-02-14' },
      { local_code: 'L4', target_id: 'C2', decision: 'keep' },
    ], { extraColumns: ['decided_at'] });
    const r = applyDecisions({ ...input, now: undefined });
    expect(r.audit.map((a) => a.time)).toEqual(['2026-02-14T00:00:00.000Z', '']);
  });

  it('undoes the worklist writer\'s formula neutralisation (a note that begins with =)', async () => {
    const { input } = await setup([{ local_code: 'L3', target_id: 'C5', decision: 'keep', note: '=1+1 is not a formula' }]);
    expect(applyDecisions(input).audit[0].note).toBe('=1+1 is not a formula');
  });

  it('writes a new target in the form of the old one: a CURIE stays a CURIE', async () => {
    const dir = tempDir();
    const release = await loadRelease(writeFile(dir, 'new.tsv', releaseTsv(RELEASE)));
    const mappings = await loadMappings(writeFile(dir, 'm.tsv', 'local_code\tlocal_label\ttarget_id\nX:L1\tMI\tV:C9\n'));
    const worklist = await readWorklist(writeFile(dir, 'w.csv', `local_code,target_id,proposed_target,decision\r\nX:L1,V:C9,C1,accept\r\n`));
    expect(applyDecisions({ mappings, worklist, release, releaseLabel: 'v' }).rows[0].targetId).toBe('V:C1');
  });

  it('reports every bad decision at once, each with line, column and code', async () => {
    const { input, worklist } = await setup([
      /* 2 */ { local_code: 'L1', target_id: 'C9', decision: 'approve' },
      /* 3 */ { local_code: 'L9', target_id: 'C1', decision: 'keep' },
      /* 4 */ { local_code: 'L1', target_id: 'C1', decision: 'keep' },
      /* 5 */ { local_code: 'L2', target_id: 'C2', decision: 'remap' },
      /* 6 */ { local_code: 'L3', target_id: 'C5', decision: 'remap', new_target: 'C77' },
      /* 7 */ { local_code: 'L4', target_id: 'C2', decision: 'remap', new_target: 'C4' },
      /* 8 */ { local_code: 'L5', target_id: 'C1', decision: 'accept' },
      /* 9 */ { local_code: 'L5', target_id: 'C3', decision: 'keep', new_target: 'C2' },
      /* 10 */ { local_code: '', target_id: 'C3', decision: 'keep' },
    ]);
    const problems = problemsOf(input);
    const col = (name: (typeof WORKLIST_COLUMNS)[number]) => WORKLIST_COLUMNS.indexOf(name) + 1;
    expect(problems.map((p) => [p.line, p.column, p.code])).toEqual([
      [2, col('decision'), 'unknown_decision'],
      [3, col('local_code'), 'unknown_mapping'],
      [4, col('local_code'), 'unknown_mapping'],
      [5, col('new_target'), 'missing_new_target'],
      [6, col('new_target'), 'target_not_in_release'],
      [7, col('new_target'), 'target_inactive'],
      [8, col('proposed_target'), 'no_proposed_target'],
      [9, col('new_target'), 'contradictory_target'],
      [10, col('local_code'), 'empty_local_code'],
    ]);
    expect(problems.every((p) => p.file === worklist.path && p.message && p.fix)).toBe(true);
    // L1 is in the set, mapped to C9: the message says so.
    expect(problems[2].message).toContain('"C9"');
    const err = (() => { try { applyDecisions(input); } catch (e) { return e as DecisionError; } })()!;
    expect(err.code).toBe('bad_decision');
    expect(err.describe().split('\n')[0]).toBe(`${worklist.path}:2:${col('decision')}: unknown decision "approve" for "L1"`);
    expect(err.describe()).toMatch(/9 problems; nothing was written$/);
  });

  it('refuses two decisions for one mapping, even identical ones', async () => {
    const { input } = await setup([
      { local_code: 'L3', target_id: 'C5', decision: 'keep' },
      { local_code: 'L3', target_id: 'C5', decision: 'keep' },
    ]);
    expect(problemsOf(input).map((p) => [p.line, p.code])).toEqual([[3, 'duplicate_decision']]);
  });

  it('refuses a result with two mappings of one code on the same target', async () => {
    const { input } = await setup([{ local_code: 'L5', target_id: 'C1', decision: 'remap', new_target: 'C3' }]);
    expect(problemsOf(input).map((p) => p.code)).toEqual(['duplicate_result']);
  });

  it('refuses rows made for another release, and decided_at values that are not times', async () => {
    const { input } = await setup([
      { local_code: 'L3', target_id: 'C5', decision: 'keep', new_sha256: 'f'.repeat(64) },
      { local_code: 'L4', target_id: 'C2', decision: 'keep', decided_at: 'soon' },
    ], { extraColumns: ['decided_at'] });
    expect(problemsOf(input).map((p) => p.code)).toEqual(['release_mismatch', 'bad_time']);
  });

  it('turns unreadable worklist rows into problems, and a worklist without a decision column into a header error', async () => {
    const { input } = await setup([{ local_code: 'L3', target_id: 'C5', decision: 'keep' }]);
    const dir = tempDir();
    const broken = await readWorklist(writeFile(dir, 'w.csv', 'local_code,target_id,decision\r\nL3,C5,keep\r\nL4,C2\r\n'));
    expect(problemsOf({ ...input, worklist: broken }).map((p) => [p.line, p.code])).toEqual([[3, 'unreadable_row']]);
    const noDecision = await readWorklist(writeFile(dir, 'x.csv', 'local_code,target_id\r\nL3,C5\r\n')).catch((e) => e);
    expect(noDecision).toBeInstanceOf(TermdriftError);
    expect(noDecision.code).toBe('header_missing_column');
  });

  it('has a test for every problem code', () => {
    // The codes exercised above and in tests/cli/apply.test.ts.
    const covered = ['unreadable_row', 'empty_local_code', 'unknown_mapping', 'unknown_decision', 'duplicate_decision', 'no_proposed_target', 'missing_new_target', 'target_not_in_release', 'target_inactive', 'contradictory_target', 'duplicate_result', 'release_mismatch', 'bad_time'];
    expect([...DECISION_PROBLEMS].sort()).toEqual(covered.sort());
  });
});

describe('the audit log', () => {
  const row = { local_code: 'L1', local_label: '=cmd', old_target: 'C9', new_target: 'C1', decision: 'accept' as const, reviewer: 'A', note: 'a, b', release: 'v', release_sha256: 'x', time: '' };

  it('starts with its header and neutralises formula triggers, like the worklist (OWASP CSV Injection)', () => {
    expect(appendAudit('a.csv', undefined, [row])).toBe(`${AUDIT_HEADER}\r\nL1,"'=cmd",C9,C1,accept,A,"a, b",v,x,\r\n`);
  });

  it('appends to a log with the same header and refuses another file', () => {
    const first = appendAudit('a.csv', undefined, [row]);
    expect(appendAudit('a.csv', first, [{ ...row, local_code: 'L2' }]).split('\r\n').filter(Boolean)).toHaveLength(3);
    expect(() => appendAudit('a.csv', 'some,other,header\r\n', [row])).toThrow(TermdriftError);
  });
});
