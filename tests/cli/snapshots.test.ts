/**
 * Golden files: the demo report in five forms and CLI transcripts (command, exit code, output).
 * After a deliberate change: `npm run snapshots`, then review `git diff snapshots/`.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { cliCases, cliTranscript, demoReports, snapshotPath } from '../../src/devtools/snapshots.js';
import { RENDER_FORMATS } from '../../src/render/index.js';

describe('demo report golden files', async () => {
  const reports = await demoReports();
  it.each(RENDER_FORMATS)('%s matches snapshots/', (format) => {
    expect(reports[format]).toBe(readFileSync(snapshotPath(format), 'utf8'));
  });
});

describe('CLI transcripts', () => {
  it.each(cliCases().map((c) => [c.name, c] as const))('%s', (name, c) => {
    expect(cliTranscript(c)).toBe(readFileSync(`snapshots/cli/${name}.txt`, 'utf8'));
  });
});
