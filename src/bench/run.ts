/**
 * `npm run bench`: generate release pairs with the ground-truth generator and time termdrift
 * against baselines, each measurement in its own process (src/bench/phase.ts) so that peak memory
 * (maxRSS) is that phase's alone. Prints a Markdown table and writes bench-out/results.json;
 * the figures are copied into docs/BENCHMARKS.md with the machine they were taken on.
 *
 * Options: --sizes 250000,1000000 (concepts; ≈ 4 terms each) --repeat 3 --skip-sqlite --out DIR
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, statSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

interface Measurement {
  phase: string;
  size: number;
  seconds: number;
  maxRssMb: number;
  runs: number[];
  result?: unknown;
}

const here = fileURLToPath(new URL('.', import.meta.url));
const arg = (name: string, fallback: string) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : fallback;
};
const sizes = arg('sizes', '250000,1000000').split(',').map(Number);
const repeat = Number(arg('repeat', '3'));
const skipSqlite = process.argv.includes('--skip-sqlite');
const outDir = arg('out', 'bench-out');
const heap = '--max-old-space-size=6144';

function phase(name: string, args: string[]): { seconds: number; maxRssMb: number; result: unknown } {
  const r = spawnSync(process.execPath, [heap, join(here, 'phase.js'), name, ...args], { encoding: 'utf8', maxBuffer: 1 << 26 });
  if (r.status !== 0) throw new Error(`phase ${name} failed: ${r.stderr}`);
  return JSON.parse(r.stdout.trim().split('\n').pop()!);
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

function generate(concepts: number): string {
  const dir = join(outDir, `gen-${concepts}`);
  if (!existsSync(join(dir, 'mappings.tsv'))) {
    mkdirSync(dir, { recursive: true });
    const t0 = Date.now();
    execFileSync(process.execPath, [heap, join(here, '..', 'gen', 'main.js'), '--concepts', String(concepts), '--seed', '7', '--out', dir, '--mappings-every', '5'], { stdio: 'inherit' });
    process.stderr.write(`generated ${concepts} concepts in ${((Date.now() - t0) / 1000).toFixed(1)} s\n`);
  }
  return dir;
}

const results: Measurement[] = [];
/** `name` is the row's label; the phase run is its part before any "-" (split-all runs split). */
const record = (name: string, size: number, args: string[], times: number) => {
  const runs: { seconds: number; maxRssMb: number; result: unknown }[] = [];
  for (let i = 0; i < times; i++) runs.push(phase(name.split('-')[0], args));
  const m: Measurement = { phase: name, size, seconds: median(runs.map((r) => r.seconds)), maxRssMb: Math.max(...runs.map((r) => r.maxRssMb)), runs: runs.map((r) => Math.round(r.seconds * 100) / 100), result: runs[0].result };
  results.push(m);
  process.stderr.write(`${name} @${size}: ${m.seconds.toFixed(2)} s, ${m.maxRssMb.toFixed(0)} MB (runs ${m.runs.join(', ')})\n`);
  return m;
};

mkdirSync(outDir, { recursive: true });
const rowsOf: Record<number, number> = {};
const mb: Record<number, number> = {};
for (const size of sizes) {
  const dir = generate(size);
  const f = (n: string) => join(dir, n);
  const pair = [f('old.tsv'), f('new.tsv')];
  mb[size] = (statSync(pair[0]).size + statSync(pair[1]).size) / 2 / 1e6;
  const all = [...pair, f('old-hierarchy.tsv'), f('new-hierarchy.tsv'), f('history.tsv')];
  const split = record('split', size, pair, repeat);
  rowsOf[size] = ((split.result as number[])[0] ?? 0);
  // The floor for a diff given hierarchies and history too: the bare split of all five files.
  record('split-all', size, all, repeat);
  record('load', size, pair, repeat);
  // `diff-pair`: the two releases alone (the job SQLite's import and join is compared with);
  // `diff`: with both hierarchies and the history table.
  record('diff-pair', size, pair, repeat);
  record('diff', size, all, repeat);
  if (size === Math.max(...sizes)) {
    record('check', size, [...pair, f('old-hierarchy.tsv'), f('new-hierarchy.tsv'), f('history.tsv'), f('mappings.tsv')], 1);
    if (!skipSqlite) record('sqlite', size, pair, 1);
  }
}

const get = (p: string, s: number) => results.find((r) => r.phase === p && r.size === s);
const lines: string[] = [];
lines.push(`Machine: ${cpus().length} × ${cpus()[0]?.model ?? 'cpu'}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}; load average at the end ${loadavg().map((x) => x.toFixed(1)).join(' ')}`);
lines.push('');
lines.push('| concepts | MB per file | phase | median s | peak RSS MB | ratio to split | runs |');
lines.push('|---|---|---|---|---|---|---|');
for (const r of results) {
  // diff and check read five files: their floor is the split of all five.
  const split = get(r.phase === 'diff' || r.phase === 'check' ? 'split-all' : 'split', r.size)!;
  lines.push(`| ${r.size} | ${mb[r.size].toFixed(0)} | ${r.phase} | ${r.seconds.toFixed(2)} | ${r.maxRssMb.toFixed(0)} | ${(r.seconds / split.seconds).toFixed(2)} | ${r.runs.join(', ')} |`);
}
const big = Math.max(...sizes);
const small = Math.min(...sizes);
const sq = get('sqlite', big);
const d = get('diff', big);
const dp = get('diff-pair', big);
if (sq && dp) lines.push('', `SQLite import + join / termdrift diff of the two releases at ${big} concepts: ${(sq.seconds / dp.seconds).toFixed(2)} ×`);
const ck = get('check', big);
const parts = (ck?.result as { parts?: { load: number; diff: number; rescore: number } } | undefined)?.parts;
if (ck && d && parts) lines.push(`check at ${big} concepts: load ${parts.load.toFixed(2)} s, diff ${parts.diff.toFixed(2)} s, re-scoring ${parts.rescore.toFixed(2)} s; re-scoring / the diff command (${d.seconds.toFixed(2)} s) = ${(parts.rescore / d.seconds).toFixed(2)}`);
if (big !== small) {
  const g = (p: string) => get(p, big)!.seconds / get(p, small)!.seconds;
  lines.push(`Growth ${small} → ${big} concepts (×${(big / small).toFixed(0)} rows): split ×${g('split').toFixed(2)}, load ×${g('load').toFixed(2)}, diff-pair ×${g('diff-pair').toFixed(2)}, diff ×${g('diff').toFixed(2)}`);
}
const table = lines.join('\n');
process.stdout.write(table + '\n');
writeFileSync(join(outDir, 'results.json'), JSON.stringify({ results, table }, null, 2));
