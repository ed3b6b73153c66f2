/**
 * Run the built CLI (`dist/cli/main.js`; `npm test` builds before it tests) as a child process,
 * and the checks every run must pass whatever its input: it ended by itself (no signal, so no
 * out-of-memory abort), with a documented exit code (0, 1 or 2, never 70 = internal error), and
 * nothing on standard error looks like a stack trace or a Node.js crash.
 */
import { spawnSync, type SpawnSyncOptions } from 'node:child_process';
import { resolve } from 'node:path';
import { expect } from 'vitest';

export const MAIN = resolve('dist/cli/main.js');
export const DEMO = resolve('demo-data');

export interface CliRun {
  args: string[];
  status: number | null;
  signal: NodeJS.Signals | null;
  stdout: string;
  stderr: string;
}

export function runCli(args: string[], options: SpawnSyncOptions = {}): CliRun {
  const r = spawnSync(process.execPath, [MAIN, ...args], {
    encoding: 'utf8',
    maxBuffer: 1 << 28,
    ...options,
    env: { ...process.env, NO_COLOR: '1', TERMDRIFT_DEBUG: '', ...(options.env ?? {}) },
  });
  return { args, status: r.status, signal: r.signal, stdout: String(r.stdout), stderr: String(r.stderr) };
}

/** A frame of a V8 stack trace ("    at fn (file:1:2)"), or what Node prints when it crashes. */
const CRASH = /^\s+at .*(:\d+:\d+\)?|\(native\)|<anonymous>)$|FATAL ERROR|Segmentation fault|internal error|Uncaught|node:internal|ERR_[A-Z_]+/m;

/** The run ended with one of the documented exit codes and printed no stack trace. */
export function expectCleanExit(r: CliRun, status: number): void {
  const what = `termdrift ${r.args.join(' ')}\n${r.stderr.slice(0, 2000)}`;
  expect(r.signal, what).toBeNull();
  expect(r.status, what).not.toBe(70);
  expect(r.stderr, what).not.toMatch(CRASH);
  expect(r.status, what).toBe(status);
}
