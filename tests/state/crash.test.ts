/**
 * Crash safety of the state folder: a child process writing runs is killed with SIGKILL, and the
 * state must still load and hold every run it reported complete. Three kills: at a random moment
 * of a write loop, halfway through writing a run file, and after the new index is written but
 * before it is renamed into place (the child stops itself there through atomicWrite's test hooks,
 * so those two moments are hit every time, not by luck of timing).
 */
import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { StateStore } from '../../src/state/stateStore.js';
import { tempDir } from '../helpers/files.js';

const WRITER = resolve('tests/state/crashWriter.mjs');

/** Run the writer until a stdout line matches `until`, then SIGKILL it; resolves with the lines seen. */
function runAndKill(dir: string, mode: string, until: RegExp, size = 2000): Promise<string[]> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [WRITER, dir, mode, String(size)], { stdio: ['ignore', 'pipe', 'pipe'] });
    const lines: string[] = [];
    let buf = '';
    let err = '';
    let killed = false;
    child.stdout.on('data', (chunk: Buffer) => {
      buf += chunk.toString('utf8');
      let nl = buf.indexOf('\n');
      while (nl >= 0) {
        const line = buf.slice(0, nl);
        buf = buf.slice(nl + 1);
        lines.push(line);
        if (!killed && until.test(line)) {
          killed = true;
          child.kill('SIGKILL');
        }
        nl = buf.indexOf('\n');
      }
    });
    child.stderr.on('data', (c: Buffer) => (err += c.toString('utf8')));
    child.on('exit', (code, signal) => {
      if (signal === 'SIGKILL') done(lines);
      else fail(new Error(`the writer ended by itself (code ${code}): ${err}`));
    });
  });
}

function committed(lines: string[]): number {
  return lines.filter((l) => l.startsWith('committed ')).length;
}

describe('the state after a SIGKILL', () => {
  it('holds every run reported complete when killed during a write loop (three times over)', async () => {
    const dir = tempDir();
    let reported = 0;
    for (let round = 1; round <= 3; round++) {
      const lines = await runAndKill(dir, 'loop', new RegExp(`^committed ${reported + 4}$`));
      reported = Math.max(reported, ...lines.filter((l) => l.startsWith('committed ')).map((l) => Number(l.split(' ')[1])));
      const store = StateStore.open(dir);
      const runs = store.loadRuns(); // checks every file's SHA-256
      // The kill may land after the commit of a run that had not yet been reported.
      expect(runs.length).toBeGreaterThanOrEqual(reported);
      expect(runs.length).toBeLessThanOrEqual(reported + 1);
      expect(runs.every((r) => r.rows.length === 2000)).toBe(true);
      expect(store.runs.map((e) => e.id)).toEqual(runs.map((_, i) => i + 1));
      reported = runs.length;
    }
  });

  it('keeps the previous state when killed halfway through writing a run file', async () => {
    const dir = tempDir();
    const lines = await runAndKill(dir, 'partial', /^stopped mid-write$/);
    expect(committed(lines)).toBe(2);
    // The half-written temporary file is there, and ignored.
    expect(readdirSync(join(dir, 'runs')).some((n) => n.endsWith('.tmp'))).toBe(true);
    const store = StateStore.open(dir);
    expect(store.loadRuns().map((r) => r.releases.new.label)).toEqual(['v2', 'v3']);
    // The next write tidies up the dead writer's temporary file.
    store.recordDecisions([]);
    expect(readdirSync(join(dir, 'runs')).some((n) => n.endsWith('.tmp'))).toBe(false);
  });

  it('keeps the previous state when killed before the new index is renamed into place', async () => {
    const dir = tempDir();
    const lines = await runAndKill(dir, 'before-index', /^stopped before the index rename$/);
    expect(committed(lines)).toBe(2);
    // The third run's file is complete on disk, but the index does not name it yet.
    expect(readdirSync(join(dir, 'runs')).filter((n) => n.endsWith('.json'))).toHaveLength(3);
    const store = StateStore.open(dir);
    expect(store.loadRuns()).toHaveLength(2);
    // Recording goes on from there; the orphan is removed.
    store.recordRun({ ...store.loadRun(store.runs[1]), releases: { old: { label: 'x', sha256: '1'.repeat(64), path: 'x' }, new: { label: 'y', sha256: '2'.repeat(64), path: 'y' } } });
    expect(StateStore.open(dir).loadRuns()).toHaveLength(3);
    expect(readdirSync(join(dir, 'runs')).filter((n) => n.endsWith('.json'))).toHaveLength(3);
  });
});
