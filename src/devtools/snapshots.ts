/**
 * Golden files: the demo report in all five forms (snapshots/demo-r1-r2.*) and CLI transcripts
 * (snapshots/cli/NAME.txt: the command, its exit code, stdout and stderr) for the cases listed in
 * snapshots/cli/cases.json. `npm run snapshots` rewrites them after a deliberate change;
 * tests/cli/snapshots.test.ts compares fresh output with them. Run from the repository root.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { resolve } from 'node:path';
import { runCheck } from '../pipeline.js';
import { renderReport, RENDER_FORMATS, type RenderFormat } from '../render/index.js';

export const DEMO = {
  old: 'demo-data/release-r1.tsv',
  new: 'demo-data/release-r2.tsv',
  oldHierarchy: 'demo-data/hierarchy-r1.tsv',
  newHierarchy: 'demo-data/hierarchy-r2.tsv',
  history: 'demo-data/history-r2.tsv',
  mappings: 'demo-data/mappings.tsv',
};

const EXT: Record<RenderFormat, string> = { text: 'txt', json: 'json', md: 'md', csv: 'csv', html: 'html' };

export const snapshotPath = (format: RenderFormat) => `snapshots/demo-r1-r2.${EXT[format]}`;

/** The demo report in every form, as `termdrift demo --format F --no-color` writes it. */
export async function demoReports(): Promise<Record<RenderFormat, string>> {
  const { report } = await runCheck(DEMO);
  const out = {} as Record<RenderFormat, string>;
  for (const f of RENDER_FORMATS) out[f] = renderReport(f, report, { color: false });
  return out;
}

export interface CliCase {
  name: string;
  args: string[];
}

export function cliCases(): CliCase[] {
  return JSON.parse(readFileSync('snapshots/cli/cases.json', 'utf8')) as CliCase[];
}

/** Run the built CLI and render a transcript. */
export function cliTranscript(c: CliCase): string {
  // The built CLI (npm test builds before it runs the tests).
  const main = resolve('dist/cli/main.js');
  const r = spawnSync(process.execPath, [main, ...c.args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', TERMDRIFT_DEBUG: '' } });
  return `$ termdrift ${c.args.join(' ')}\nexit: ${r.status}\n--- stdout\n${r.stdout}--- stderr\n${r.stderr}`;
}

async function main() {
  const reports = await demoReports();
  for (const f of RENDER_FORMATS) writeFileSync(snapshotPath(f), reports[f]);
  for (const c of cliCases()) writeFileSync(`snapshots/cli/${c.name}.txt`, cliTranscript(c));
  process.stdout.write('snapshots rewritten: review them with git diff before committing\n');
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await main();
