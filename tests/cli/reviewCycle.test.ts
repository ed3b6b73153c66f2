/**
 * The review loop through the command line, on the demo scenario (demo-data/, invented), in a
 * fresh working folder so the default state folder .termdrift/ lands there:
 *   check r1→r2 (state recorded) → fill the worklist → apply → check r2→r3 with the updated
 *   mappings → check r2→r3 again: the accepted and kept mappings are reported as settled.
 * Also: --fail-on and --summary-json for schedulers, --no-state, the demo writing no state, apply
 * writing nothing on a bad worklist, and the FHIR and SSSOM outputs of apply read back.
 * The tests that run the CLI many times get a generous guard timeout for a loaded machine; no
 * test here measures speed.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse as parseCsv } from 'csv-parse/sync';
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import { loadMappings } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';

const MAIN = resolve('dist/cli/main.js');
const D = resolve('demo-data');
const demo = (name: string) => join(D, name);

function cli(cwd: string, args: string[]) {
  const r = spawnSync(process.execPath, [MAIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

const releaseArgs = (a: string, b: string) => [demo(`release-${a}.tsv`), demo(`release-${b}.tsv`), '--old-hierarchy', demo(`hierarchy-${a}.tsv`), '--new-hierarchy', demo(`hierarchy-${b}.tsv`), '--history', demo(`history-${b}.tsv`), '--old-label', a, '--new-label', b];

type WorklistRow = Record<string, string>;

function readCsv(path: string): WorklistRow[] {
  return parseCsv(readFileSync(path, 'utf8'), { columns: true }) as WorklistRow[];
}

describe('the review cycle over r1, r2 and r3', () => {
  const cwd = tempDir();
  const state = join(cwd, '.termdrift');

  it('runs check → apply → check → check, and reports the reviewed mappings as settled', () => {
    // 1. check r1 → r2: the worklist, and the run recorded in .termdrift/ (the default).
    const c1 = cli(cwd, ['check', ...releaseArgs('r1', 'r2'), '--mappings', demo('mappings.tsv'), '--format', 'csv', '--out', 'worklist.csv']);
    expect(c1.code).toBe(0);
    expect(statSync(state).mode & 0o777).toBe(0o700);
    const worklist = readCsv(join(cwd, 'worklist.csv'));
    expect(worklist.length).toBeGreaterThan(20);

    // 2. The reviewers' decisions, filled in programmatically.
    const decided = new Map<string, string>();
    for (const r of worklist) {
      if (r.verdict === 'redirect' && r.proposed_target) r.decision = 'accept';
      else if (r.verdict === 'context_changed') r.decision = 'keep';
      else if (r.verdict === 'broken') r.decision = 'retire';
      else if (r.verdict === 'ambiguous' && r.other_candidates) {
        r.decision = 'remap';
        r.new_target = r.other_candidates.split(' ')[0];
      } else continue;
      r.reviewer = 'Terminology group';
      r.note = `cycle test: ${r.verdict}`;
      decided.set(r.local_code, r.decision);
    }
    const counts = (d: string) => [...decided.values()].filter((x) => x === d).length;
    expect(counts('accept')).toBeGreaterThan(3);
    expect(counts('keep')).toBeGreaterThan(0);
    expect(counts('retire')).toBeGreaterThan(0);
    expect(counts('remap')).toBeGreaterThan(0);
    writeFileSync(join(cwd, 'worklist-filled.csv'), stringifyCsv(worklist, { header: true, columns: Object.keys(worklist[0]), record_delimiter: 'windows' }));

    // 3. apply: the new release is found through the run recorded in the state.
    const a = cli(cwd, ['apply', 'worklist-filled.csv', '--mappings', demo('mappings.tsv'), '--out', 'mappings-r2.tsv', '--audit', 'audit.csv', '--now', '2026-03-01T10:00:00Z']);
    expect(a.err).toBe('');
    expect(a.code).toBe(0);
    const audit = readCsv(join(cwd, 'audit.csv'));
    expect(audit).toHaveLength(decided.size);
    expect(audit.every((r) => r.release === 'r2' && r.time === '2026-03-01T10:00:00.000Z' && r.reviewer === 'Terminology group')).toBe(true);
    const before = readFileSync(demo('mappings.tsv'), 'utf8').trim().split('\n').length;
    const after = readFileSync(join(cwd, 'mappings-r2.tsv'), 'utf8').trim().split('\n').length;
    expect(after).toBe(before - counts('retire'));
    const updated = new Map((readCsv(join(cwd, 'audit.csv'))).map((r) => [r.local_code, r]));
    for (const r of worklist.filter((w) => w.decision === 'accept')) expect(updated.get(r.local_code)?.new_target).toBe(r.proposed_target);

    // 4. check r2 → r3 with the updated mappings, twice.
    const args = ['check', ...releaseArgs('r2', 'r3'), '--mappings', 'mappings-r2.tsv', '--format', 'json'];
    expect(cli(cwd, [...args, '--out', 'r2-r3.json']).code).toBe(0);
    const first = JSON.parse(readFileSync(join(cwd, 'r2-r3.json'), 'utf8'));
    const second = JSON.parse(cli(cwd, args).out);
    for (const report of [first, second]) {
      const settled = report.mappings.filter((m: any) => m.settled);
      // Every settled mapping is one the reviewers accepted, kept or remapped.
      for (const m of settled) expect(['accept', 'keep', 'remap']).toContain(decided.get(m.local_code));
      // Accepted and kept mappings are settled unless a change of r3 touches their target again.
      for (const m of report.mappings.filter((x: any) => ['accept', 'keep'].includes(decided.get(x.local_code) ?? ''))) {
        expect(Boolean(m.settled), m.local_code).toBe(m.change_ids.length === 0);
        if (m.settled) expect(m.settled).toMatchObject({ decision: decided.get(m.local_code), reviewer: 'Terminology group', release: 'r2', time: '2026-03-01T10:00:00.000Z' });
      }
      // Exactly the reviewed mappings (accepted, kept, remapped) whose target no change of r3 touches.
      const expected = report.mappings.filter((m: any) => ['accept', 'keep', 'remap'].includes(decided.get(m.local_code) ?? '') && m.change_ids.length === 0);
      expect(settled.map((m: any) => m.local_code).sort()).toEqual(expected.map((m: any) => m.local_code).sort());
      expect(settled.length).toBeGreaterThan(counts('accept'));
      // The history covers both recorded runs and all three releases.
      expect(report.history.runs.map((r: any) => `${r.old}>${r.new}`)).toEqual(['r1>r2', 'r2>r3']);
      expect(report.history.releases.map((r: any) => r.label)).toEqual(['r1', 'r2', 'r3']);
    }
    expect(second.mappings).toEqual(first.mappings);

    // 5. The worklist of r2 → r3 leaves the settled mappings out.
    cli(cwd, ['check', ...releaseArgs('r2', 'r3'), '--mappings', 'mappings-r2.tsv', '--format', 'csv', '--out', 'worklist-r3.csv']);
    const listed = new Set(readCsv(join(cwd, 'worklist-r3.csv')).map((r) => r.local_code));
    for (const m of second.mappings.filter((x: any) => x.settled)) expect(listed.has(m.local_code)).toBe(false);

    // 6. history: the recorded runs, and a sparkline per mapping.
    const h = cli(cwd, ['history']);
    expect(h.code).toBe(0);
    expect(h.out).toContain('2 runs, 3 releases (r1, r2, r3)');
    expect(h.out).toMatch(/[▁▂▃▄▅▆▇█]{2}/);
    const hj = JSON.parse(cli(cwd, ['history', '--format', 'json', '--code', 'LAB-0401']).out);
    expect(hj.mappings).toHaveLength(1);
    expect(hj.mappings[0].scores).toHaveLength(3);
  }, 300_000);

  it('leaves settled mappings out of --fail-on', () => {
    const args = ['check', ...releaseArgs('r2', 'r3'), '--mappings', 'mappings-r2.tsv', '--format', 'json', '--fail-on', 'ok', '--summary-json', 'summary.json'];
    const withState = cli(cwd, args);
    const report = JSON.parse(withState.out);
    const summary = JSON.parse(readFileSync(join(cwd, 'summary.json'), 'utf8'));
    const unsettled = report.mappings.filter((m: any) => !m.settled).length;
    expect(report.fail_on).toEqual({ level: 'ok', reached: unsettled > 0, mappings: unsettled });
    expect(summary.settled).toBe(report.mappings.length - unsettled);
    expect(summary.settled).toBeGreaterThan(0);
    const noState = JSON.parse(cli(cwd, [...args, '--no-state']).out);
    expect(noState.fail_on.mappings).toBe(noState.mappings.length);
    expect(noState.history).toBeUndefined();
    expect(noState.mappings.some((m: any) => m.settled)).toBe(false);
  }, 300_000);
});

describe('--fail-on and --summary-json', () => {
  // The order of the levels as the issue states it: broken > drifted > ambiguous > redirect >
  // context_changed > ok, with unknown_target ranked with broken (src/rank/failOn.ts).
  const ORDER = ['ok', 'context_changed', 'redirect', 'ambiguous', 'drifted', 'broken'];
  const rank = (v: string) => (v === 'unknown_target' ? ORDER.indexOf('broken') : ORDER.indexOf(v));

  it('exits 1 exactly when some mapping reaches the level, for every level', () => {
    const cwd = tempDir();
    const base = ['check', ...releaseArgs('r1', 'r2'), '--mappings', demo('mappings.tsv'), '--no-state', '--format', 'json'];
    const verdicts: string[] = JSON.parse(cli(cwd, base).out).mappings.map((m: any) => m.verdict);
    for (const level of [...ORDER].reverse()) {
      const r = cli(cwd, [...base, '--fail-on', level, '--summary-json', 's.json']);
      const expected = verdicts.filter((v) => rank(v) >= rank(level)).length;
      expect(r.code, level).toBe(expected > 0 ? 1 : 0);
      const s = JSON.parse(readFileSync(join(cwd, 's.json'), 'utf8'));
      expect(s.fail_on, level).toEqual({ level, reached: expected > 0, mappings: expected });
      expect(Object.values(s.verdicts as Record<string, number>).reduce((a, b) => a + b, 0)).toBe(verdicts.length);
      expect(s.releases).toEqual({ old: 'r1', new: 'r2' });
    }
    // A level no mapping reaches exits 0: one mapping that nothing touches.
    const okOnly = join(cwd, 'ok.tsv');
    writeFileSync(okOnly, 'local_code\tlocal_label\ttarget_id\nLAB-0401\tFBC\tQV10169A\n');
    const r = cli(cwd, ['check', ...releaseArgs('r1', 'r2'), '--mappings', okOnly, '--no-state', '--fail-on', 'context_changed', '--summary-json', 's.json']);
    expect(r.code).toBe(0);
    expect(JSON.parse(readFileSync(join(cwd, 's.json'), 'utf8')).fail_on).toEqual({ level: 'context_changed', reached: false, mappings: 0 });
  }, 300_000);

  it('rejects an unknown level with exit 2', () => {
    const r = cli(tempDir(), ['check', demo('release-r1.tsv'), demo('release-r2.tsv'), '--mappings', demo('mappings.tsv'), '--fail-on', 'bad', '--no-state']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--fail-on must be one of broken, drifted, ambiguous, redirect, context_changed, ok/);
  });
});

describe('state only where asked', () => {
  it('check --no-state and demo write no state; demo --state DIR does', () => {
    const cwd = tempDir();
    expect(cli(cwd, ['check', ...releaseArgs('r1', 'r2'), '--mappings', demo('mappings.tsv'), '--no-state', '--format', 'json']).code).toBe(0);
    expect(cli(cwd, ['demo', '--format', 'json']).code).toBe(0);
    expect(readdirSync(cwd)).toEqual([]);
    expect(cli(cwd, ['demo', '--format', 'json', '--state', 'st']).code).toBe(0);
    expect(existsSync(join(cwd, 'st', 'index.json'))).toBe(true);
  }, 300_000);
});

describe('apply', () => {
  it('writes nothing when the worklist has a bad decision, and lists every problem', () => {
    const cwd = tempDir();
    const r = cli(cwd, ['apply', resolve('tests/fixtures/cli/worklist-bad.csv'), '--mappings', demo('mappings.tsv'), '--release-file', demo('release-r2.tsv'), '--out', 'm2.tsv', '--audit', 'audit.csv', '--state', 'st']);
    expect(r.code).toBe(2);
    expect(readdirSync(cwd)).toEqual([]);
    const lines = r.err.split('\n').filter((l) => /worklist-bad\.csv:\d+:\d+: /.test(l));
    expect(lines).toHaveLength(10);
    expect(r.err).toMatch(/10 problems; nothing was written/);
  });

  it('writes nothing when the audit log cannot be written either', () => {
    const cwd = tempDir();
    const r = cli(cwd, ['apply', resolve('tests/fixtures/cli/worklist-sssom-r1-r2.csv'), '--mappings', demo('mappings.sssom.tsv'), '--release-file', demo('release-r2.tsv'), '--out', 'm2.sssom.tsv', '--audit', 'no/such/folder/audit.csv', '--no-state']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--audit no\/such\/folder\/audit.csv: the folder no\/such\/folder does not exist/);
    expect(readdirSync(cwd)).toEqual([]);
  });

  it('needs the new release: --release-file, or a recorded run that read it', () => {
    const cwd = tempDir();
    const r = cli(cwd, ['apply', resolve('tests/fixtures/cli/worklist-sssom-r1-r2.csv'), '--mappings', demo('mappings.sssom.tsv'), '--out', 'm2.sssom.tsv']);
    expect(r.code).toBe(2);
    expect(r.err).toMatch(/--release-file/);
    expect(readdirSync(cwd)).toEqual([]);
    // A release other than the worklist's is refused row by row.
    const wrong = cli(cwd, ['apply', resolve('tests/fixtures/cli/worklist-sssom-r1-r2.csv'), '--mappings', demo('mappings.sssom.tsv'), '--out', 'm2.sssom.tsv', '--release-file', demo('release-r3.tsv')]);
    expect(wrong.code).toBe(2);
    expect(wrong.err).toMatch(/made for another release/);
  });

  it('writes a FHIR ConceptMap or SSSOM by the name of --out, and both read back', async () => {
    const cwd = tempDir();
    const base = ['apply', resolve('tests/fixtures/cli/worklist-sssom-r1-r2.csv'), '--mappings', demo('mappings.sssom.tsv'), '--release-file', demo('release-r2.tsv'), '--no-state'];
    expect(cli(cwd, [...base, '--out', 'm2.json']).code).toBe(0);
    expect(cli(cwd, [...base, '--out', 'm2.sssom.tsv']).code).toBe(0);
    const fhir = JSON.parse(readFileSync(join(cwd, 'm2.json'), 'utf8'));
    expect(fhir.resourceType).toBe('ConceptMap');
    // The release label is the worklist's new_release (the file name: that check had no --new-label).
    expect(fhir.group[0].targetVersion).toBe('release-r2');
    const [a, b] = await Promise.all([loadMappings(join(cwd, 'm2.json')), loadMappings(join(cwd, 'm2.sssom.tsv'))]);
    expect(a.mappings).toHaveLength(149);
    expect(b.mappings).toHaveLength(149);
    // The same mappings, with the CURIE prefixes of SSSOM and the bare codes of FHIR.
    expect(a.mappings.map((m) => `${m.localCode}>${m.targetId}`)).toEqual(b.mappings.map((m) => `${m.localCode.replace(/^FHGH:/, '')}>${m.targetId.replace(/^QCV:/, '')}`));
    const remapped = b.mappings.find((m) => m.localCode === 'FHGH:DXP-2050')!;
    expect(remapped.targetId).toBe('QCV:QV21178N');
    expect(remapped.extra.mapping_justification).toBe('semapv:MappingReview');
    expect(b.metadata?.object_source_version).toBe('release-r2');
  });
});
