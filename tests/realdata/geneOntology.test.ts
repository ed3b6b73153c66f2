/**
 * A perturbation benchmark on a real vocabulary: the Gene Ontology (Debian r-bioc-go.db
 * 3.16.0-1, GO release 2022-07-01, read by termdrift's importer). The old release is GO's
 * molecular function and cellular component ontologies (every MF and CC term, active and
 * obsolete, with its synonyms and the is_a edges among them; GO's is_a edges stay inside one
 * ontology, so none is cut; two categories let category changes be injected). The generator's injector (src/gen/inject.ts,
 * seeded, through the generic term source) makes the new release, its history table and the
 * truth; src/gen/mappings.ts draws a mapping set from the real GO terms and synonyms with its
 * local-label noise. `runCheck` reads the written tables, and the test scores its changes
 * against the truth by (kind, from, to) per kind, its verdicts against the mapping truth, and
 * its top suggestion against the successor the truth names.
 *
 * The floors sit a little below what was measured (docs/REAL-DATA.md, "Perturbation
 * benchmark on the Gene Ontology"). GO.sqlite is fetched by scripts/fetch-go.sh into the cache
 * outside the repo; the test skips, saying why, only when it is absent and cannot be fetched.
 * GO_BENCH_PRINT=1 prints the verdict table and the misses.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it, type TestContext } from 'vitest';
import { CHANGE_KINDS, type ChangeKind } from '../../src/classify/types.js';
import { goCacheDir, readGeneOntology } from '../../src/importers/geneOntology.js';
import { baseReleaseFromRows } from '../../src/gen/genericTerms.js';
import { injectChanges, type InjectResult } from '../../src/gen/inject.js';
import { generateMappings } from '../../src/gen/mappings.js';
import { writeDataset } from '../../src/gen/writeDataset.js';
import type { BaseRelease, GenMapping, MappingTruth } from '../../src/gen/types.js';
import type { CheckReport } from '../../src/report/types.js';
import { runCheck } from '../../src/pipeline.js';
import { key, render, score } from '../helpers/changeAccuracy.js';
import { VERDICTS, type Verdict } from '../../src/rescore/types.js';

const FETCH = join(process.cwd(), 'scripts', 'fetch-go.sh');
const SEED = 7;


let unavailable = '';
let base: BaseRelease;
let inj: InjectResult;
let mappings: GenMapping[];
let mappingTruth: MappingTruth[];
let report: CheckReport;

beforeAll(async () => {
  const cached = join(goCacheDir(), 'GO.sqlite');
  if (!existsSync(cached)) {
    const r = spawnSync('bash', [FETCH], { encoding: 'utf8', timeout: 280_000 });
    if (r.status !== 0 || !existsSync(cached)) {
      unavailable = `GO.sqlite is not cached at ${cached} and scripts/fetch-go.sh could not fetch it (exit ${r.status ?? r.signal}): ${(r.stderr ?? '').trim().split('\n').slice(-3).join(' / ')}`;
      return;
    }
  }
  const go = readGeneOntology(cached);
  // The subset: the MF and CC ontologies, is_a edges restricted to them.
  const rows = go.release.filter((r) => r.category === 'MF' || r.category === 'CC');
  const ids = new Set(rows.map((r) => r.concept_id));
  const hierarchy = go.hierarchy.filter((h) => ids.has(h.concept_id) && ids.has(h.parent_id));
  base = baseReleaseFromRows(rows, hierarchy);
  inj = injectChanges(base, { seed: SEED });
  ({ mappings, truth: mappingTruth } = generateMappings(base, inj, { seed: SEED, every: 10 }));
  const dir = mkdtempSync(join(tmpdir(), 'termdrift-go-bench-'));
  const { paths } = await writeDataset(dir, { old: base, new: inj.newRelease, history: inj.history, truth: inj.truth, mappings, mappingTruth });
  ({ report } = await runCheck({ old: paths.old, new: paths.new, oldHierarchy: paths.oldHierarchy, newHierarchy: paths.newHierarchy, history: paths.history, mappings: paths.mappings }));
}, 300_000);

function needGo(ctx: TestContext): void {
  if (unavailable) ctx.skip(unavailable);
}

interface VerdictScore {
  /** Truth verdict → [right, total]. */
  perVerdict: Map<Verdict, [number, number]>;
  right: number;
  confusion: Map<string, number>;
  /** Mappings whose truth names a successor, by truth verdict: [top-1 right, total]. */
  top1: Map<Verdict, [number, number]>;
  misses: string[];
}

function scoreMappings(): VerdictScore {
  const byCode = new Map(report.mappings.map((m) => [m.local_code, m]));
  const label = new Map(mappings.map((m) => [m.local_code, m]));
  const out: VerdictScore = { perVerdict: new Map(), right: 0, confusion: new Map(), top1: new Map(), misses: [] };
  const bump = (map: Map<Verdict, [number, number]>, v: Verdict, ok: boolean) => {
    const cell = map.get(v) ?? [0, 0];
    if (ok) cell[0]++;
    cell[1]++;
    map.set(v, cell);
  };
  for (const t of mappingTruth) {
    const m = byCode.get(t.local_code)!;
    const ok = m.verdict === t.verdict;
    bump(out.perVerdict, t.verdict, ok);
    if (ok) out.right++;
    else out.confusion.set(`${t.verdict} → ${m.verdict}`, (out.confusion.get(`${t.verdict} → ${m.verdict}`) ?? 0) + 1);
    const top = m.suggestions[0]?.concept_id ?? '';
    if (t.successor) bump(out.top1, t.verdict, top === t.successor);
    if (!ok || (t.successor && top !== t.successor)) {
      const g = label.get(t.local_code)!;
      out.misses.push(`${t.local_code} ${g.target_id} "${g.local_label}": truth ${t.verdict} ${t.successor}, got ${m.verdict} ${m.suggestions.slice(0, 2).map((s) => `${s.concept_id} ${s.score} ${s.reason}`).join('; ')}`);
    }
  }
  return out;
}

const sum = (m: Map<Verdict, [number, number]>): [number, number] => [...m.values()].reduce<[number, number]>((a, c) => [a[0] + c[0], a[1] + c[1]], [0, 0]);

function renderMappings(s: VerdictScore): string {
  const rows = VERDICTS.map((v) => `${v.padEnd(16)} ${(s.perVerdict.get(v) ?? [0, 0]).join('/').padStart(9)}  top-1 ${(s.top1.get(v) ?? [0, 0]).join('/')}`);
  return [...rows, ...[...s.confusion].map(([k, n]) => `${k}: ${n}`), '', ...s.misses.slice(0, 40)].join('\n');
}

// Source of every check below: Gene Ontology, Debian r-bioc-go.db 3.16.0-1, GO release 2022-07-01.
describe('perturbation benchmark on the Gene Ontology (MF and CC of GO 2022-07-01, r-bioc-go.db 3.16.0-1)', () => {
  it('starts from every MF and CC term, injects every change kind, and reads every row back', (ctx) => {
    needGo(ctx);
    // MF 11,238 + 1,215 obsolete, CC 4,180 + 294 obsolete (the importer's counts, docs/REAL-DATA.md).
    expect(base.concepts.length).toBe(11238 + 1215 + 4180 + 294);
    // Measured with seed 7: 25 to 74 changes of each kind (category_change 31, MF ↔ CC).
    for (const k of CHANGE_KINDS) expect(inj.injected[k], k).toBeGreaterThanOrEqual(20);
    expect(report.rejected_rows).toEqual([]);
    expect(report.warnings).toEqual([]);
    expect(report.mappings.length).toBe(mappings.length);
  });

  it('finds the injected changes with precision and recall ≥ 0.95 for every kind', (ctx) => {
    needGo(ctx);
    // Measured: 617 changes, precision and recall 1.000 for all 13 kinds (no false positive, no
    // miss). The floor allows one miss in the smallest kinds (25 id_reuse, 25 reorganization).
    const table = score(inj.truth, report.changes);
    const failing = CHANGE_KINDS.filter((k) => table[k].precision < 0.95 || table[k].recall < 0.95 || table[k].tp === 0);
    if (failing.length) console.log(render(table));
    expect(failing).toEqual([]);
    // Cosmetic edits (case, punctuation) are reported as nothing.
    const touched = new Set(report.changes.flatMap((c) => [...c.from, ...c.to]));
    expect(inj.cosmetic.filter((id) => touched.has(id))).toEqual([]);
  });

  it('gives the mappings drawn from GO terms and synonyms their verdicts and successors', (ctx) => {
    needGo(ctx);
    const s = scoreMappings();
    const [top1, named] = sum(s.top1);
    const fail = () => console.log(renderMappings(s));
    if (process.env.GO_BENCH_PRINT) fail();
    // Measured: verdicts 1,542 of 1,574 right (0.980); the 32 wrong are 30 redirect → ambiguous
    // (a successor named by history or term flow that the label scores low against, or a close
    // lexical rival) and 2 ok → drifted (a renamed concept whose dropped name is nearer a
    // neighbour). Floor 0.96.
    if (s.right / mappingTruth.length < 0.96) fail();
    expect(s.right / mappingTruth.length).toBeGreaterThanOrEqual(0.96);
    // No mapping with a changed target is called ok, and none with an unchanged one broken.
    expect(s.confusion.get('broken → ok') ?? 0).toBe(0);
    expect(s.confusion.get('redirect → ok') ?? 0).toBe(0);
    expect(s.confusion.get('ok → broken') ?? 0).toBe(0);
    // Measured: successor top-1 350 of 358 (0.978); the 8 misses are all split or reorganization
    // parts whose terms differ in punctuation or spelling only. Floor 0.95 overall, and 0.98 for
    // redirects (measured 100 %: the release's named successor leads even when ambiguous).
    if (top1 / named < 0.95) fail();
    expect(top1 / named).toBeGreaterThanOrEqual(0.95);
    const [rTop, rNamed] = s.top1.get('redirect') ?? [0, 0];
    expect(rNamed).toBeGreaterThan(100);
    expect(rTop / rNamed).toBeGreaterThanOrEqual(0.98);
  });

  it('scores a report against the truth as intended (the scorer itself)', () => {
    const truth = [{ kind: 'merge' as const, from: ['A', 'B'], to: ['B'] }, { kind: 'retirement' as const, from: ['C'], to: [] }];
    const found = [{ kind: 'merge' as const, from: ['A', 'B'], to: ['B'] }, { kind: 'retirement' as const, from: ['D'], to: [] }];
    const t = score(truth, found);
    expect([t.merge.tp, t.merge.fp, t.merge.fn]).toEqual([1, 0, 0]);
    expect([t.retirement.tp, t.retirement.fp, t.retirement.fn]).toEqual([0, 1, 1]);
    expect(render(t)).toContain('FN retirement C > ');
  });
});
