/**
 * Hostile input through the real CLI, and the CLI's own footprint:
 *  - HTML: releases and a mapping set whose terms, categories, identifiers, codes and labels are
 *    script tags, event attributes, `javascript:` links and markup (tests/reliability/hostile/)
 *    go through `check --format html`; the page is parsed with parse5 (it follows the WHATWG
 *    HTML parsing algorithm, so it sees what a browser sees): every element and attribute name
 *    is one the demo report has too (nothing comes from the input), no event handler, links
 *    only to anchors of the page, one script and one style, and each hostile string shows as
 *    text. The Content-Security-Policy forbids every load (CSP Level 3: default-src 'none';
 *    the one style and script admitted by hash).
 *  - CSV: `check --format csv` read back with csv-parse: no cell begins with a spreadsheet
 *    formula trigger (OWASP "CSV Injection": = + - @ tab CR LF), and each neutralised value
 *    is the input's with one leading quote.
 *  - paths given on the command line are files, never options, code or shell: names such as
 *    `--help`, `-x`, `$(touch pwned)`, `file;rm`, spaces and non-ASCII letters, after `--`.
 *  - the state folder of `check --state` is 0700 and its files 0600.
 *  - no network: the demo, and every other command on local files (validate, diff, check,
 *    apply, history, import), runs with every socket, DNS lookup and HTTP(S) request made to
 *    throw (a preload given with NODE_OPTIONS=--require) and gives the same output as without
 *    it; the demo also runs inside `unshare -n` (a network namespace with no interface but
 *    loopback down) when the tests run as root.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync, copyFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parse } from 'parse5';
import { parse as parseCsv } from 'csv-parse/sync';
import { stringify as stringifyCsv } from 'csv-stringify/sync';
import { tempDir } from '../helpers/files.js';
import { DEMO, MAIN, expectCleanExit, runCli, type CliRun } from './cli.js';

const HOSTILE = resolve('tests/reliability/hostile');
const hostileArgs = (format: string) => ['check', join(HOSTILE, 'release-r1.tsv'), join(HOSTILE, 'release-r2.tsv'), '--mappings', join(HOSTILE, 'mappings.csv'), '--no-state', '--format', format];

interface Node {
  nodeName: string;
  tagName?: string;
  value?: string;
  attrs?: { name: string; value: string }[];
  childNodes?: Node[];
  content?: Node;
}

function elements(node: Node, out: Node[] = []): Node[] {
  if (node.tagName) out.push(node);
  for (const c of node.childNodes ?? []) elements(c, out);
  if (node.content) elements(node.content, out);
  return out;
}

function textOf(node: Node): string {
  if (node.nodeName === '#text') return node.value ?? '';
  return (node.childNodes ?? []).map(textOf).join('');
}

function attributeValues(els: Node[]): string[] {
  return els.flatMap((e) => (e.attrs ?? []).map((a) => a.value));
}

const names = (els: Node[]) => ({
  tags: new Set(els.map((e) => e.tagName!)),
  attrs: new Set(els.flatMap((e) => (e.attrs ?? []).map((a) => a.name))),
});

/** The strings of the hostile files (no control characters, so they show as they are). */
const HOSTILE_STRINGS = [
  '<script>alert(1)</script>',
  'x" onmouseover="alert(1)',
  '<img src=x onerror=alert(1)>',
  '[click](javascript:alert(1))',
  '<iframe src="javascript:alert(1)"></iframe> thing',
  '<b onclick=alert(1)>disorder</b>',
  '=HYPERLINK("http://evil.example","x")',
];

describe('HTML report from hostile input files', () => {
  const run = runCli(hostileArgs('html'));
  const demo = runCli(['demo', '--format', 'html']);

  it('has only elements and attributes of its own, and no event handler or remote link', () => {
    expectCleanExit(run, 0);
    expectCleanExit(demo, 0);
    const els = elements(parse(run.stdout) as unknown as Node);
    const own = names(elements(parse(demo.stdout) as unknown as Node));
    const got = names(els);
    // Every element and attribute name also occurs in the demo's page: none came from the input.
    expect([...got.tags].filter((t) => !own.tags.has(t))).toEqual([]);
    expect([...got.attrs].filter((a) => !own.attrs.has(a))).toEqual([]);
    expect(els.filter((e) => e.tagName === 'script')).toHaveLength(1);
    expect(els.filter((e) => e.tagName === 'style')).toHaveLength(1);
    for (const e of els) {
      for (const a of e.attrs ?? []) {
        expect(a.name.startsWith('on'), `${e.tagName} ${a.name}`).toBe(false);
        if (a.name === 'href') expect(a.value, `${e.tagName} href`).toMatch(/^#[\w-]+$/);
        // No attribute that loads or navigates (the hostile text sits in title attributes, escaped).
        expect(['src', 'srcset', 'action', 'formaction', 'xlink:href', 'background', 'poster', 'data'].includes(a.name), `${e.tagName} ${a.name}`).toBe(false);
      }
    }
  });

  it('shows every hostile string of the input as text', () => {
    const doc = parse(run.stdout) as unknown as Node;
    const els = elements(doc);
    const shown = textOf(doc) + '\n' + attributeValues(els).join('\n');
    for (const s of HOSTILE_STRINGS) expect(shown, s).toContain(s);
    // … and never as markup in the page's bytes.
    for (const s of ['<script>alert', '<img src=x', '<iframe', 'onmouseover="', '<b onclick']) expect(run.stdout).not.toContain(s);
  });

  it('forbids every load with its Content-Security-Policy', () => {
    const els = elements(parse(run.stdout) as unknown as Node);
    const meta = els.filter((e) => e.tagName === 'meta' && e.attrs?.some((a) => a.name === 'http-equiv' && a.value === 'Content-Security-Policy'));
    expect(meta).toHaveLength(1);
    const policy = meta[0].attrs!.find((a) => a.name === 'content')!.value;
    const directives = Object.fromEntries(policy.split(';').map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k, v]));
    expect(directives['default-src']).toEqual(["'none'"]);
    expect(directives['script-src']).toHaveLength(1);
    expect(directives['script-src'][0]).toMatch(/^'sha256-[A-Za-z0-9+/]+=*'$/);
    expect(directives['style-src'][0]).toMatch(/^'sha256-[A-Za-z0-9+/]+=*'$/);
    expect(directives['base-uri']).toEqual(["'none'"]);
    expect(directives['form-action']).toEqual(["'none'"]);
    expect(policy).not.toMatch(/https?:|\*|unsafe-|data:|blob:/);
    // The policy comes before anything the page could load.
    expect(run.stdout.indexOf('Content-Security-Policy')).toBeLessThan(run.stdout.indexOf('<style'));
  });
});

describe('CSV worklist from hostile input files', () => {
  it('has no cell that begins with a formula trigger; neutralised cells keep the value after one quote', () => {
    const run = runCli(hostileArgs('csv'));
    expectCleanExit(run, 0);
    const rows = parseCsv(run.stdout, { relax_column_count: false }) as string[][];
    expect(rows.length).toBeGreaterThan(3);
    for (const row of rows) for (const cell of row) expect(cell, cell).not.toMatch(/^[=+\-@\t\r\n]/);
    const codes = rows.slice(1).map((r) => r[0]);
    // The codes given in the input, each behind one quote (see src/render/csv.ts).
    expect(codes).toEqual(expect.arrayContaining([`'=HYPERLINK("http://evil.example","x")`, "'-2", "'@SUM(A1:A9)"]));
    const cells = rows.flat();
    expect(cells).toContain("'=cmd|' /C calc'!A0 combined disorder");
    expect(cells).toContain("'-cmd");
  });
});

describe('paths on the command line are only files', () => {
  const release = readFileSync(join(DEMO, 'release-r1.tsv'));
  const NAMES = ['--help', '-x', '$(touch pwned).tsv', 'file;rm -rf x.tsv', 'with spaces.tsv', 'ünïcødé 名前.tsv', '`id`.tsv', "it's.tsv"];

  it.each(NAMES)('validate -- %s reads that file', (name) => {
    const dir = tempDir('termdrift-paths-');
    writeFileSync(join(dir, name), release);
    const r = runCli(['validate', '--kind', 'release', '--format', 'json', '--', name], { cwd: dir });
    expectCleanExit(r, 0);
    const out = JSON.parse(r.stdout) as { file: string; accounting: { read: number } };
    expect(out.file).toBe(name);
    expect(out.accounting.read).toBeGreaterThan(0);
    // Nothing was run: no file appeared beside the input.
    expect(readdirSync(dir)).toEqual([name]);
  });

  it('diff and check take such names for every input and for --out', () => {
    const dir = tempDir('termdrift-paths-');
    const files = { old: '-x', new: '--help', hierarchy: '$(touch pwned)', history: 'file;rm', mappings: 'ünï cødé.tsv', out: '-o;$(id).json' };
    copyFileSync(join(DEMO, 'release-r1.tsv'), join(dir, files.old));
    copyFileSync(join(DEMO, 'release-r2.tsv'), join(dir, files.new));
    copyFileSync(join(DEMO, 'hierarchy-r2.tsv'), join(dir, files.hierarchy));
    copyFileSync(join(DEMO, 'history-r2.tsv'), join(dir, files.history));
    copyFileSync(join(DEMO, 'mappings.tsv'), join(dir, files.mappings));
    const r = runCli(['check', '--new-hierarchy', files.hierarchy, '--history', files.history, '--mappings', files.mappings, '--no-state', '--format', 'json', '--out', files.out, '--', files.old, files.new], { cwd: dir });
    expectCleanExit(r, 0);
    const report = JSON.parse(readFileSync(join(dir, files.out), 'utf8')) as { inputs: { role: string; path: string }[] };
    expect(Object.fromEntries(report.inputs.map((i) => [i.role, i.path]))).toEqual({ old: files.old, new: files.new, new_hierarchy: files.hierarchy, history: files.history, mappings: files.mappings });
    expect(readdirSync(dir).sort()).toEqual(Object.values(files).sort());
    // Without `--`, a name that looks like an option is taken as one: refused as an unknown option.
    const bare = runCli(['diff', files.old, files.mappings], { cwd: dir });
    expectCleanExit(bare, 2);
    expect(bare.stderr).toContain("unknown option '-x'");
  });
});

describe('the state folder', () => {
  it('check --state creates it 0700 and writes its files 0600', () => {
    const dir = join(tempDir('termdrift-state-'), 'nested', 'state');
    const r = runCli(['check', join(DEMO, 'release-r1.tsv'), join(DEMO, 'release-r2.tsv'), '--mappings', join(DEMO, 'mappings.tsv'), '--state', dir, '--format', 'json']);
    expectCleanExit(r, 0);
    const walk = (d: string): string[] => readdirSync(d).flatMap((f) => (statSync(join(d, f)).isDirectory() ? [join(d, f), ...walk(join(d, f))] : [join(d, f)]));
    const entries = [dir, ...walk(dir)];
    expect(entries.some((p) => p.endsWith('index.json'))).toBe(true);
    for (const p of entries) {
      const mode = statSync(p).mode & 0o777;
      expect(mode.toString(8), p).toBe(statSync(p).isDirectory() ? '700' : '600');
    }
  });
});

describe('no network access', () => {
  const preload = resolve('tests/reliability/no-network.cjs');
  const formats = ['text', 'json', 'md', 'csv', 'html'];
  const normal = Object.fromEntries(formats.map((f) => [f, runCli(['demo', '--format', f, '--no-color'])]));

  it('the preload makes every network call throw', () => {
    const probe = (code: string) => spawnSync(process.execPath, ['--require', preload, '-e', code], { encoding: 'utf8' });
    for (const code of [
      "require('net').connect(80, '127.0.0.1')",
      "require('dns').lookup('example.org', () => {})",
      "require('http').get('http://127.0.0.1/')",
      "require('https').request('https://127.0.0.1/')",
      "require('tls').connect(443, '127.0.0.1')",
      "fetch('http://127.0.0.1/')",
    ]) {
      const r = probe(code);
      expect(r.status, code).not.toBe(0);
      expect(r.stderr, code).toContain('termdrift test: network access attempted');
    }
    // termdrift is ES modules: named imports of the built-ins must be replaced too.
    const esm = (code: string) => spawnSync(process.execPath, ['--require', preload, '--input-type=module', '-e', code], { encoding: 'utf8' });
    for (const code of [
      "import { connect } from 'node:net'; connect(80, '127.0.0.1');",
      "import { request } from 'node:http'; request('http://127.0.0.1/');",
      "import { get } from 'node:https'; get('https://127.0.0.1/');",
      "import { lookup } from 'node:dns/promises'; await lookup('example.org');",
      "import { connect } from 'node:http2'; connect('http://127.0.0.1/');",
      "import { createSocket } from 'node:dgram'; createSocket('udp4');",
    ]) {
      const r = esm(code);
      expect(r.status, code).not.toBe(0);
      expect(r.stderr, code).toContain('termdrift test: network access attempted');
    }
  });

  it.each(formats)('the demo (--format %s) gives the same output with the network made unreachable', (format) => {
    const r = runCli(['demo', '--format', format, '--no-color'], { env: { NODE_OPTIONS: `--require ${preload}` } });
    expectCleanExit(r, 0);
    expect(r.stdout).toBe(normal[format].stdout);
  });

  /**
   * The other commands, in the order of a review, each on local files only: validate (a release
   * and a mapping set), diff, check (recording its run in the state folder .termdrift/ and
   * writing the worklist), apply (on the worklist with decisions filled in), history (text and
   * JSON), and import from a local copy of a published release: the IANA Language Subtag
   * Registry, File-Date 2014-03-13, as packaged by npm language-subtag-registry@0.3.2 (the
   * devDependency `lsr-2014`). Run in a fresh folder, with `env` added to the environment and,
   * with `unshare`, each command inside `unshare -n`; returns each step's standard output and
   * every file the steps wrote.
   */
  function session(env: Record<string, string>, unshare = false): { outputs: Record<string, string>; files: Record<string, string> } {
    const cwd = tempDir('termdrift-offline-');
    const demo = (f: string) => join(DEMO, f);
    const releases = [demo('release-r1.tsv'), demo('release-r2.tsv'), '--old-hierarchy', demo('hierarchy-r1.tsv'), '--new-hierarchy', demo('hierarchy-r2.tsv'), '--history', demo('history-r2.tsv')];
    const outputs: Record<string, string> = {};
    const step = (name: string, args: string[]) => {
      let r: CliRun;
      if (unshare) {
        const u = spawnSync('unshare', ['-n', process.execPath, MAIN, ...args], { cwd, encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, NO_COLOR: '1', TERMDRIFT_DEBUG: '', ...env } });
        r = { args, status: u.status, signal: u.signal, stdout: String(u.stdout), stderr: String(u.stderr) };
      } else r = runCli(args, { cwd, env });
      expectCleanExit(r, 0);
      outputs[name] = r.stdout;
    };
    step('validate release', ['validate', '--kind', 'release', demo('release-r2.tsv'), '--format', 'json']);
    step('validate mapping', ['validate', '--kind', 'mapping', demo('mappings.tsv')]);
    step('diff', ['diff', ...releases, '--format', 'json']);
    step('check', ['check', ...releases, '--mappings', demo('mappings.tsv'), '--format', 'csv', '--out', 'worklist.csv']);
    // Decisions: accept every proposed redirect, keep every changed context.
    const worklist = parseCsv(readFileSync(join(cwd, 'worklist.csv'), 'utf8'), { columns: true }) as Record<string, string>[];
    let decided = 0;
    for (const row of worklist) {
      if (row.verdict === 'redirect' && row.proposed_target) row.decision = 'accept';
      else if (row.verdict === 'context_changed') row.decision = 'keep';
      else continue;
      row.reviewer = 'Offline test';
      decided++;
    }
    expect(decided).toBeGreaterThan(3);
    writeFileSync(join(cwd, 'worklist-filled.csv'), stringifyCsv(worklist, { header: true, columns: Object.keys(worklist[0]) }));
    step('apply', ['apply', 'worklist-filled.csv', '--mappings', demo('mappings.tsv'), '--out', 'mappings-r2.tsv', '--audit', 'audit.csv', '--now', '2026-03-01T10:00:00Z']);
    step('history', ['history']);
    step('history json', ['history', '--format', 'json']);
    const registry = resolve('node_modules/lsr-2014');
    expect(existsSync(registry)).toBe(true);
    step('import', ['import', 'language-subtags', registry, '--out', 'imported']);
    const files: Record<string, string> = {};
    for (const f of readdirSync(cwd, { recursive: true, encoding: 'utf8' }).sort()) {
      if (statSync(join(cwd, f)).isFile()) files[f] = readFileSync(join(cwd, f), 'utf8');
    }
    return { outputs, files };
  }

  let plainSession: ReturnType<typeof session> | undefined;
  const plain = () => (plainSession ??= session({}));

  it('validate, diff, check, apply, history and import work with the network made unreachable, with the same output', () => {
    const log = join(tempDir('termdrift-offline-log-'), 'preload.log');
    const offline = session({ NODE_OPTIONS: `--require ${preload}`, NO_NETWORK_LOG: log });
    // The preload was in force in every run (one process each: no input is large enough to
    // make termdrift run itself again), and nothing tried the network and went on.
    const lines = readFileSync(log, 'utf8').trim().split('\n');
    expect(lines.filter((l) => l.startsWith('attempt'))).toEqual([]);
    const commands = lines.map((l) => l.split(' ')[2]);
    expect(commands).toEqual(['validate', 'validate', 'diff', 'check', 'apply', 'history', 'history', 'import']);
    expect(Object.keys(offline.outputs)).toHaveLength(8);
    expect(offline.outputs).toEqual(plain().outputs);
    // The files each step wrote: the worklist, the updated mapping set, the audit log, the state
    // folder, the imported tables.
    for (const f of ['worklist.csv', 'mappings-r2.tsv', 'audit.csv', join('.termdrift', 'index.json'), join('imported', 'release.tsv'), join('imported', 'history.tsv'), join('imported', 'hierarchy.tsv')]) {
      expect(Object.keys(offline.files), f).toContain(f);
    }
    expect(offline.files).toEqual(plain().files);
    expect(offline.outputs.history).toContain('1 run, 2 releases');
    expect(offline.files['audit.csv'].trim().split('\n').length).toBeGreaterThan(3);
  }, 300_000);

  const root = process.getuid?.() === 0 && spawnSync('unshare', ['-n', 'true']).status === 0;
  it.runIf(root)('the demo runs inside a network namespace with no network (unshare -n)', () => {
    for (const format of ['json', 'html']) {
      const r = spawnSync('unshare', ['-n', process.execPath, MAIN, 'demo', '--format', format, '--no-color'], { encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, NO_COLOR: '1' } });
      expect(r.status, r.stderr).toBe(0);
      expect(r.stdout).toBe(normal[format].stdout);
    }
  });

  it.runIf(root)('validate, diff, check, apply, history and import run inside a network namespace with no network (unshare -n), with the same output', () => {
    const isolated = session({}, true);
    expect(Object.keys(isolated.outputs)).toHaveLength(8);
    expect(isolated.outputs).toEqual(plain().outputs);
    expect(isolated.files).toEqual(plain().files);
  }, 300_000);

});
