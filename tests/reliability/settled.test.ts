/**
 * Property (fast-check), through the real CLI: apply followed by check on the same release
 * reports the applied decisions as settled (docs/STATE.md, "Settled mappings").
 *
 * The worklist of `check r1 → r2` on the demo scenario (demo-data/, invented) gets a random
 * decision on each row: none, keep, retire, accept (when the row proposes a target) or remap (to
 * the first of the other candidates), with a reviewer and a note of random text. `apply` writes
 * the new mapping set and records the decisions in a fresh state folder; `check r1 → r2` again,
 * with that mapping set and that state folder, must then mark as settled exactly the mappings a
 * keep, accept or remap left on their target, with that decision, reviewer, note, release and
 * time (reviewer and note as trimmed by the worklist reader), and nothing else; a retired mapping
 * is gone from the set.
 *
 * A random choice that would leave two mappings of one local code on the same target (which
 * apply rightly refuses, `duplicate_result`) is turned into keep, so that every case applies.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse as parseCsv } from 'csv-parse/sync';
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import { loadMappings } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';
import { DEMO, expectCleanExit, runCli } from './cli.js';

const d = (f: string) => join(DEMO, f);
const RELEASES = [d('release-r1.tsv'), d('release-r2.tsv'), '--old-hierarchy', d('hierarchy-r1.tsv'), '--new-hierarchy', d('hierarchy-r2.tsv'), '--history', d('history-r2.tsv')];
const NOW = '2026-03-01T10:00:00.000Z';

type Row = Record<string, string>;
type Choice = '' | 'keep' | 'retire' | 'accept' | 'remap';

let worklist: Row[] = [];
let columns: string[] = [];
/** The targets of each local code in the demo mapping set. */
const targetsOf = new Map<string, string[]>();

beforeAll(async () => {
  const dir = tempDir('termdrift-settled-');
  const r = runCli(['check', ...RELEASES, '--mappings', d('mappings.tsv'), '--no-state', '--format', 'csv', '--out', join(dir, 'worklist.csv')]);
  expectCleanExit(r, 0);
  const text = readFileSync(join(dir, 'worklist.csv'), 'utf8');
  worklist = parseCsv(text, { columns: true }) as Row[];
  columns = Object.keys(worklist[0]);
  for (const m of (await loadMappings(d('mappings.tsv'))).mappings) targetsOf.set(m.localCode, [...(targetsOf.get(m.localCode) ?? []), m.targetId]);
});

/** What the reviewers wrote, and what each decided mapping must be settled as. */
function decide(picks: number[], reviewers: string[], notes: string[]) {
  const ending = new Map([...targetsOf].map(([code, ts]) => [code, new Set(ts)]));
  const rows: Row[] = [];
  const settled = new Map<string, { decision: string; reviewer: string; note: string }>();
  const retired = new Set<string>();
  worklist.forEach((w, k) => {
    const options: Choice[] = ['', 'keep', 'retire'];
    if (w.proposed_target) options.push('accept');
    if (w.other_candidates) options.push('remap');
    let choice = options[picks[k] % options.length];
    const remapTo = w.other_candidates.split(' ')[0];
    const to = choice === 'accept' ? w.proposed_target : choice === 'remap' ? remapTo : w.target_id;
    const ends = ending.get(w.local_code)!;
    if ((choice === 'accept' || choice === 'remap') && to !== w.target_id && ends.has(to)) choice = 'keep';
    const row: Row = { ...w, decision: choice, new_target: choice === 'remap' ? remapTo : '', reviewer: choice ? reviewers[k] : '', note: choice ? notes[k] : '' };
    rows.push(row);
    if (choice === '') return;
    const key = `${w.local_code}>${w.target_id}`;
    if (choice === 'retire') {
      ends.delete(w.target_id);
      retired.add(key);
      return;
    }
    const target = choice === 'keep' ? w.target_id : to;
    ends.delete(w.target_id);
    ends.add(target);
    // The worklist reader trims every cell (src/apply/readWorklist.ts), so the state holds them trimmed.
    settled.set(`${w.local_code}>${target}`, { decision: choice, reviewer: row.reviewer.trim(), note: row.note.trim() });
  });
  return { rows, settled, retired };
}

// Reviewer names and notes: letters, digits, spaces, commas, double quotes, line breaks and
// non-ASCII letters, never a leading quote or formula trigger (which a worklist cell would carry
// neutralised, see src/render/csv.ts).
const text = fc.string({ unit: fc.constantFrom(...'abcXYZ09 ,"é名\n'.split('')), maxLength: 24 }).map((s) => `r${s}`);

describe('apply, then check on the same release', () => {
  it('reports exactly the applied keep, accept and remap decisions as settled', async () => {
    expect(worklist.length).toBeGreaterThan(20);
    const n = worklist.length;
    await fc.assert(
      fc.asyncProperty(fc.array(fc.nat(), { minLength: n, maxLength: n }), fc.array(text, { minLength: n, maxLength: n }), fc.array(text, { minLength: n, maxLength: n }), async (picks, reviewers, notes) => {
        const dir = tempDir('termdrift-settled-');
        const state = join(dir, 'state');
        const { rows, settled, retired } = decide(picks, reviewers, notes);
        writeFileSync(join(dir, 'filled.csv'), stringifyCsv(rows, { header: true, columns }));
        const a = runCli(['apply', join(dir, 'filled.csv'), '--mappings', d('mappings.tsv'), '--release-file', d('release-r2.tsv'), '--out', join(dir, 'applied.tsv'), '--state', state, '--now', NOW]);
        expectCleanExit(a, 0);
        const c = runCli(['check', ...RELEASES, '--mappings', join(dir, 'applied.tsv'), '--state', state, '--format', 'json']);
        expectCleanExit(c, 0);
        const report = JSON.parse(c.stdout) as { mappings: { local_code: string; target_id: string; settled?: Record<string, string> }[] };
        const key = (m: { local_code: string; target_id: string }) => `${m.local_code}>${m.target_id}`;
        const got = report.mappings.filter((m) => m.settled);
        expect(got.map(key).sort()).toEqual([...settled.keys()].sort());
        for (const m of got) {
          const want = settled.get(key(m))!;
          expect(m.settled).toMatchObject({ decision: want.decision, reviewer: want.reviewer, note: want.note, release: worklist[0].new_release, time: NOW });
        }
        const present = new Set(report.mappings.map(key));
        for (const k of retired) if (!settled.has(k)) expect(present.has(k), k).toBe(false);
        expect(report.mappings).toHaveLength([...targetsOf.values()].flat().length - retired.size);
      }),
      { numRuns: 8 },
    );
  }, 300_000);
});
