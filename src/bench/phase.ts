/**
 * One benchmark measurement, run in its own process so that its peak memory (maxRSS) is its own.
 * Usage: node dist/bench/phase.js PHASE ARGS… ; prints one JSON line {phase, seconds, maxRssMb, result}.
 *
 * Phases:
 *  split FILE…            bare Node read-and-split of each file (the floor any loader is compared to)
 *  load FILE…             termdrift's loadRelease of each file, concurrently as the pipeline does
 *  diff OLD NEW [OH NH H]  termdrift's whole diff (load, align, classify)
 *  check OLD NEW OH NH H M the whole check (diff, then every mapping re-scored)
 *  sqlite OLD NEW         SQLite (better-sqlite3) importing both tables and joining them on the term
 */
import { createReadStream, statSync } from 'node:fs';
import { StringDecoder } from 'node:string_decoder';
import { performance } from 'node:perf_hooks';
import { loadRelease } from '../load/index.js';
import { runDiff } from '../pipeline.js';
import { SMALL_INPUTS, tuneCollector } from '../cli/heap.js';

async function bareSplit(path: string): Promise<number> {
  const decoder = new StringDecoder('utf8');
  let carry = '';
  let fields = 0;
  for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) {
    const text = carry + decoder.write(chunk as Buffer);
    const lines = text.split('\n');
    carry = lines.pop() ?? '';
    for (const line of lines) fields += line.split('\t').length;
  }
  if (carry) fields += carry.split('\t').length;
  return fields;
}

async function sqliteJoin(oldPath: string, newPath: string): Promise<unknown> {
  const { default: Database } = await import('better-sqlite3');
  const db = new Database(':memory:');
  db.pragma('journal_mode = OFF');
  db.pragma('synchronous = OFF');
  for (const t of ['old', 'new']) db.exec(`CREATE TABLE ${t} (concept_id TEXT, term TEXT, term_type TEXT, status TEXT, category TEXT)`);
  const importFile = async (table: string, path: string) => {
    const insert = db.prepare(`INSERT INTO ${table} VALUES (?, ?, ?, ?, ?)`);
    const decoder = new StringDecoder('utf8');
    let carry = '';
    let header = true;
    let batch: string[][] = [];
    const flush = db.transaction((rows: string[][]) => {
      for (const f of rows) insert.run(f[0], f[1], f[2] ?? '', f[3] ?? '', f[4] ?? '');
    });
    for await (const chunk of createReadStream(path, { highWaterMark: 1 << 20 })) {
      const lines = (carry + decoder.write(chunk as Buffer)).split('\n');
      carry = lines.pop() ?? '';
      for (const line of lines) {
        if (header) { header = false; continue; }
        if (line) batch.push(line.split('\t'));
      }
      if (batch.length > 50000) { flush(batch); batch = []; }
    }
    if (carry) batch.push(carry.split('\t'));
    flush(batch);
  };
  await importFile('old', oldPath);
  await importFile('new', newPath);
  db.exec('CREATE INDEX new_term ON new(term)');
  const joined = db.prepare('SELECT count(*) AS n FROM old o JOIN new n ON o.term = n.term').get() as { n: number };
  const moved = db.prepare('SELECT count(*) AS n FROM old o JOIN new n ON o.term = n.term WHERE o.concept_id <> n.concept_id').get() as { n: number };
  const gone = db.prepare('SELECT count(*) AS n FROM old o WHERE NOT EXISTS (SELECT 1 FROM new n WHERE n.term = o.term)').get() as { n: number };
  db.close();
  return { joined: joined.n, moved: moved.n, gone: gone.n };
}

async function main() {
  const [phase, ...args] = process.argv.slice(2);
  // As the CLI does once it has read inputs of this size (cli/heap.ts, afterInputsRead).
  const onLoaded = (phase === 'diff' || phase === 'check') && args.reduce((n, p) => n + statSync(p).size, 0) >= SMALL_INPUTS ? () => void tuneCollector() : undefined;
  const t0 = performance.now();
  let result: unknown;
  switch (phase) {
    case 'split':
      result = await Promise.all(args.map(bareSplit));
      break;
    case 'load': {
      const rs = await Promise.all(args.map((p) => loadRelease(p)));
      result = rs.map((r) => ({ concepts: r.conceptCount, terms: r.termCount }));
      break;
    }
    case 'diff': {
      const [o, n, oh, nh, h] = args;
      const { report } = await runDiff({ old: o, new: n, oldHierarchy: oh, newHierarchy: nh, history: h, onLoaded });
      result = report.summary;
      break;
    }
    case 'check': {
      // The parts timed apart: loading every input, the diff (as `diff` does it), and the
      // re-scoring (scorer training, every mapping assessed, ranking): issue 4's "re-scoring part".
      const [o, n, oh, nh, h, m] = args;
      const { loadDiffInputs, diffReleases } = await import('../pipeline.js');
      const { loadMappings } = await import('../load/index.js');
      const { rescoreMappings } = await import('../rescore/rescoreMappings.js');
      const { rankByImpact } = await import('../rank/rankByImpact.js');
      const [inputs, mappings] = await Promise.all([loadDiffInputs({ old: o, new: n, oldHierarchy: oh, newHierarchy: nh, history: h }), loadMappings(m)]);
      onLoaded?.();
      const t1 = performance.now();
      const { report, context } = diffReleases(inputs);
      const t2 = performance.now();
      const rescored = rescoreMappings(context, report.changes, mappings);
      const ranked = rankByImpact(rescored.mappings);
      const t3 = performance.now();
      const verdicts: Record<string, number> = {};
      for (const r of ranked) verdicts[r.verdict] = (verdicts[r.verdict] ?? 0) + 1;
      result = {
        mappings: ranked.length, verdicts, scorer: rescored.scorer,
        parts: { load: (t1 - t0) / 1000, diff: (t2 - t1) / 1000, rescore: (t3 - t2) / 1000 },
      };
      break;
    }
    case 'sqlite':
      result = await sqliteJoin(args[0], args[1]);
      break;
    default:
      throw new Error(`unknown phase ${phase}`);
  }
  const seconds = (performance.now() - t0) / 1000;
  const maxRssMb = process.resourceUsage().maxRSS / 1024;
  process.stdout.write(JSON.stringify({ phase, seconds, maxRssMb, result }) + '\n');
}

await main();
