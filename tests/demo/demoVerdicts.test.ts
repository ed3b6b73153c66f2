/**
 * The demo scenario (demo-data/, invented) against its verdict table: every mapping of the
 * fictional hospital gets the verdict the scenario's author wrote down, and the successor the
 * author named is the top suggestion for nearly all of them.
 */
import { expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { runCheck } from '../../src/pipeline.js';

const D = 'demo-data/';
const table = readFileSync(`${D}expected-verdicts-r1-r2.tsv`, 'utf8').trim().split('\n').slice(1).map((l) => {
  const [code, verdict, successor] = l.split('\t');
  return { code, verdict, successor };
});

it.each([['mappings.tsv'], ['mappings.sssom.tsv']])('demo r1 → r2 with %s: verdicts and successors as the scenario says', async (file) => {
  const { report } = await runCheck({
    old: `${D}release-r1.tsv`, new: `${D}release-r2.tsv`, oldHierarchy: `${D}hierarchy-r1.tsv`, newHierarchy: `${D}hierarchy-r2.tsv`,
    history: `${D}history-r2.tsv`, mappings: `${D}${file}`,
  });
  const byCode = new Map(report.mappings.map((m) => [m.local_code.replace(/^FHGH:/, ''), m]));
  expect(report.mappings).toHaveLength(table.length);
  const wrong = table.filter((e) => byCode.get(e.code)?.verdict !== e.verdict).map((e) => `${e.code}: ${byCode.get(e.code)?.verdict} ≠ ${e.verdict}`);
  expect(wrong).toEqual([]);
  const named = table.filter((e) => e.successor && e.successor !== '=');
  const missed = named.filter((e) => byCode.get(e.code)?.suggestions[0]?.concept_id !== e.successor).map((e) => e.code);
  // Measured: 34 of 35; the miss, DXP-2116 "Leg abscess - I&D", gets the cellulitis part of the
  // split first, the abscess part second.
  expect(missed.length).toBeLessThanOrEqual(1);
});
