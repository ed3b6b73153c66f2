/**
 * The demo scenario (demo-data/, invented) against its own expectation tables: every injected
 * change is found with the right kind, from and to, and nothing else is reported.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { runDiff } from '../../src/pipeline.js';

const D = 'demo-data/';
const key = (kind: string, from: string[], to: string[]) => `${kind} ${[...from].sort().join('|')} > ${[...to].sort().join('|')}`;

function expected(a: string, b: string): string[] {
  return readFileSync(`${D}expected-changes-${a}-${b}.tsv`, 'utf8').trim().split('\n').slice(1).map((l) => {
    const [kind, from, to] = l.split('\t');
    return key(kind, from ? from.split('|') : [], to ? to.split('|') : []);
  }).sort();
}

describe.each([['r1', 'r2'], ['r2', 'r3']])('demo scenario %s → %s', (a, b) => {
  it('finds exactly the expected changes', async () => {
    const { report } = await runDiff({
      old: `${D}release-${a}.tsv`, new: `${D}release-${b}.tsv`,
      oldHierarchy: `${D}hierarchy-${a}.tsv`, newHierarchy: `${D}hierarchy-${b}.tsv`, history: `${D}history-${b}.tsv`,
    });
    expect(report.changes.map((c) => key(c.kind, c.from, c.to)).sort()).toEqual(expected(a, b));
    expect(report.rejected_rows).toEqual([]);
  });
});

it('flags the one history row of r2 that disagrees with the terms', async () => {
  const { report } = await runDiff({ old: `${D}release-r1.tsv`, new: `${D}release-r2.tsv`, history: `${D}history-r2.tsv` });
  const disagreeing = report.changes.flatMap((c) => ('history_disagrees' in c.evidence ? c.evidence.history_disagrees : []));
  expect(disagreeing.map((h) => `${h.old_id}>${h.new_id}`)).toEqual(['QV10583L>QV10597Y']);
});
