/**
 * The JSON form and its schema. Real reports (hand-built pairs, the demo releases) are validated
 * against docs/report.schema.json with Ajv in JSON Schema draft 2020-12 mode; the schema must
 * reject broken reports too, keep its enums equal to the code's lists, and every field it names
 * must be documented in docs/report-schema.md.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import Ajv2020 from 'ajv/dist/2020.js';
import { jsonChunks, renderJson } from '../../src/render/json.js';
import { diffReleases, loadDiffInputs, runDiff } from '../../src/pipeline.js';
import { loadMappings } from '../../src/load/index.js';
import { rescoreMappings } from '../../src/rescore/rescoreMappings.js';
import { rankByImpact } from '../../src/rank/rankByImpact.js';
import { makeCheckReport } from '../helpers/checkReport.js';
import { CHANGE_KINDS } from '../../src/classify/types.js';
import { VERDICTS } from '../../src/rescore/types.js';
import { ROW_PROBLEMS } from '../../src/load/types.js';
import { hostileCheck, hostileDiff } from '../helpers/hostileReport.js';
import { demoCheckReport } from '../helpers/demoCheck.js';

const schema = JSON.parse(readFileSync('docs/report.schema.json', 'utf8'));
const ajv = new Ajv2020.default({ strict: true, allErrors: true });
const validate = ajv.compile(schema);

function check(value: unknown): string[] {
  return validate(value) ? [] : (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message}`);
}

describe('renderJson', () => {
  it('is the report, 2-space indented, with a trailing newline, in the model key order', async () => {
    const report = await hostileCheck();
    const json = renderJson(report);
    expect(json.endsWith('}\n')).toBe(true);
    expect(json.split('\n')[1]).toBe('  "tool": {');
    expect(JSON.parse(json)).toEqual(report);
    expect(Object.keys(JSON.parse(json))).toEqual(Object.keys(report));
    expect(renderJson(structuredClone(report))).toBe(json);
  });

  it('in pieces (jsonChunks): the same text, each piece ending a line, a top-level array one element per piece', async () => {
    const reports = [await hostileCheck(), await hostileDiff(), await demoCheckReport()];
    for (const report of reports) {
      const pieces = [...jsonChunks(report)];
      expect(pieces.join('')).toBe(renderJson(report));
      for (const piece of pieces) expect(piece.endsWith('\n')).toBe(true);
    }
    const demo = reports[2] as unknown as { mappings: unknown[] };
    expect(demo.mappings.length).toBeGreaterThan(5);
    expect([...jsonChunks(reports[2])].length).toBeGreaterThan(demo.mappings.length);
    // Edge cases of JSON.stringify: keys without a JSON form, empty arrays and objects, holes
    // and undefined in arrays, nested arrays, an empty report.
    const odd = { a: undefined, b: [], c: {}, d: [undefined, null, [1, [2]], { e: undefined, f: 'x\ny' }], g: () => 1, h: 'last' } as unknown as Parameters<typeof renderJson>[0];
    expect([...jsonChunks(odd)].join('')).toBe(renderJson(odd));
    expect([...jsonChunks({} as Parameters<typeof renderJson>[0])].join('')).toBe(renderJson({} as Parameters<typeof renderJson>[0]));
  });
});

describe('docs/report.schema.json', () => {
  it('accepts real reports: hand-built diff and check, and the demo releases', async () => {
    expect(check(JSON.parse(renderJson(await hostileDiff())))).toEqual([]);
    expect(check(JSON.parse(renderJson(await hostileCheck())))).toEqual([]);
    const { report } = await runDiff({
      old: 'demo-data/release-r1.tsv',
      new: 'demo-data/release-r2.tsv',
      oldHierarchy: 'demo-data/hierarchy-r1.tsv',
      newHierarchy: 'demo-data/hierarchy-r2.tsv',
      history: 'demo-data/history-r2.tsv',
      now: '2026-12-01T09:00:00.000Z',
    });
    expect(report.changes.length).toBeGreaterThan(10);
    expect(check(JSON.parse(renderJson(report)))).toEqual([]);
    expect(check(JSON.parse(renderJson(await demoCheckReport())))).toEqual([]);
  });

  it('accepts a check report from the real rescoring of the demo mappings', async () => {
    // Assembled as `check` does (rescoreMappings, then rankByImpact); replace with runCheck once the pipeline has it.
    const inputs = await loadDiffInputs({ old: 'demo-data/release-r1.tsv', new: 'demo-data/release-r2.tsv', oldHierarchy: 'demo-data/hierarchy-r1.tsv', newHierarchy: 'demo-data/hierarchy-r2.tsv', history: 'demo-data/history-r2.tsv' });
    const { report, context } = diffReleases(inputs);
    const set = await loadMappings('demo-data/mappings.tsv');
    const result = rescoreMappings(context, report.changes, set);
    const real = makeCheckReport(report, rankByImpact(result.mappings), { mappingsInput: { role: 'mappings', path: set.path, sha256: set.sha256, accounting: set.accounting } });
    real.scorer = result.scorer;
    expect(real.mappings.length).toBe(set.mappings.length);
    expect(check(JSON.parse(renderJson(real)))).toEqual([]);
  });

  it('rejects reports that break the contract', async () => {
    const good = JSON.parse(renderJson(await hostileCheck()));
    const broken = (edit: (r: any) => void) => {
      const r = structuredClone(good);
      edit(r);
      return check(r).length;
    };
    expect(broken((r) => (r.mappings[0].verdict = 'fine'))).toBeGreaterThan(0);
    expect(broken((r) => delete r.caution)).toBeGreaterThan(0);
    expect(broken((r) => (r.releases.old.sha256 = 'abc'))).toBeGreaterThan(0);
    expect(broken((r) => (r.extra = 1))).toBeGreaterThan(0);
    expect(broken((r) => delete r.scorer)).toBeGreaterThan(0);
    expect(broken((r) => (r.changes.find((c: any) => c.kind === 'split').evidence.kept_identifier = 'yes'))).toBeGreaterThan(0);
    expect(broken((r) => (r.changes.find((c: any) => c.kind === 'retirement').evidence = { count: 1 }))).toBeGreaterThan(0);
    expect(broken((r) => (r.generated_at = 'yesterday'))).toBeGreaterThan(0);
  });

  it('has the same kinds, verdicts and row problems as the code', () => {
    expect(schema.$defs.change.properties.kind.enum).toEqual([...CHANGE_KINDS]);
    expect(Object.keys(schema.properties.summary.properties)).toEqual([...CHANGE_KINDS]);
    expect(schema.$defs.mapping.properties.verdict.enum).toEqual([...VERDICTS]);
    expect(Object.keys(schema.properties.verdict_summary.properties)).toEqual([...VERDICTS]);
    expect(schema.$defs.diagnostic.properties.code.enum).toEqual([...ROW_PROBLEMS]);
    expect(CHANGE_KINDS.every((k) => schema.$defs[`evidence_${k}`])).toBe(true);
  });

  it('names no field that docs/report-schema.md leaves undocumented', () => {
    const doc = readFileSync('docs/report-schema.md', 'utf8');
    const names = new Set<string>();
    const walk = (node: unknown) => {
      if (Array.isArray(node)) node.forEach(walk);
      else if (node && typeof node === 'object') {
        const o = node as Record<string, unknown>;
        if (o.properties && typeof o.properties === 'object') for (const k of Object.keys(o.properties)) names.add(k);
        Object.values(o).forEach(walk);
      }
    };
    walk(schema);
    const missing = [...names].filter((n) => !doc.includes(`\`${n}\``));
    expect(missing).toEqual([]);
  });
});
