/**
 * The state folder: layout, permissions, replacing a repeated run, decisions, and damaged files.
 */
import { describe, expect, it } from 'vitest';
import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { StateStore, serializeRun, type DecisionRecord, type RunRecord } from '../../src/state/stateStore.js';
import { TermdriftError } from '../../src/errors.js';
import { tempDir } from '../helpers/files.js';

const sha = (c: string) => c.repeat(64);

function run(oldSha: string, newSha: string, rows: RunRecord['rows'], mappingsSha = sha('a')): RunRecord {
  return {
    format: 'termdrift-run',
    version: 1,
    tool: { name: 'termdrift', version: 'test' },
    releases: { old: { label: `r${oldSha[0]}`, sha256: oldSha, path: 'old.tsv' }, new: { label: `r${newSha[0]}`, sha256: newSha, path: 'new.tsv' } },
    inputs: [{ role: 'mappings', path: 'm.tsv', sha256: mappingsSha }],
    columns: ['local_code', 'local_label', 'target_id', 'verdict', 'score_old', 'score_new', 'impact', 'settled'],
    rows,
  };
}

const decision = (code: string, over: Partial<DecisionRecord> = {}): DecisionRecord => ({ local_code: code, old_target: 'C1', new_target: 'C2', decision: 'accept', reviewer: 'A', note: '', release: 'r2', release_sha256: sha('2'), time: '', worklist_sha256: sha('w'), ...over });

describe('StateStore', () => {
  it('is empty and writes nothing until something is recorded', () => {
    const dir = join(tempDir(), 'state');
    const store = StateStore.open(dir);
    expect(store.runs).toEqual([]);
    expect(store.decisions()).toEqual([]);
    expect(() => readdirSync(dir)).toThrow();
  });

  it('creates the folder 0700 and its files 0600', () => {
    const dir = join(tempDir(), 'nested', 'state');
    const store = StateStore.open(dir);
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'ok', 0.9, 0.9, 0, '']]));
    store.recordDecisions([decision('L1')]);
    expect(statSync(dir).mode & 0o777).toBe(0o700);
    expect(statSync(join(dir, 'runs')).mode & 0o777).toBe(0o700);
    const files = [join(dir, 'index.json'), ...readdirSync(join(dir, 'runs')).map((n) => join(dir, 'runs', n)), ...readdirSync(dir).filter((n) => n.startsWith('decisions-')).map((n) => join(dir, n))];
    expect(files).toHaveLength(3);
    for (const f of files) expect(statSync(f).mode & 0o777, f).toBe(0o600);
  });

  it('adds runs in order and replaces a run with the same releases and mapping set in place', () => {
    const dir = tempDir();
    const store = StateStore.open(dir);
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'ok', 0.9, 0.8, 0, '']]));
    store.recordRun(run(sha('2'), sha('3'), [['L1', 'x', 'C1', 'ok', 0.8, 0.7, 0, '']]));
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'drifted', 0.9, 0.5, 4, '']]));
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C9', 'ok', 0.9, 0.9, 0, '']], sha('b')));
    const again = StateStore.open(dir);
    expect(again.runs.map((e) => [e.id, e.old.label, e.new.label])).toEqual([[1, 'r1', 'r2'], [2, 'r2', 'r3'], [3, 'r1', 'r2']]);
    expect(again.loadRun(again.runs[0]).rows[0][3]).toBe('drifted');
    // The replaced run's file is gone.
    expect(readdirSync(join(dir, 'runs'))).toHaveLength(3);
  });

  it('writes one mapping row per line', () => {
    const text = serializeRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'ok', 0.9, null, 0, ''], ['L2', 'y', 'C2', 'broken', 0.8, null, 5, 'keep']]));
    expect(text.split('\n').filter((l) => l.startsWith('    ["'))).toEqual(['    ["L1","x","C1","ok",0.9,null,0,""],', '    ["L2","y","C2","broken",0.8,null,5,"keep"]']);
    expect(JSON.parse(text).rows).toHaveLength(2);
  });

  it('keeps the latest decision for the same code, old target and release', () => {
    const store = StateStore.open(tempDir());
    store.recordDecisions([decision('L1'), decision('L2')]);
    store.recordDecisions([decision('L1', { decision: 'keep', new_target: 'C1' }), decision('L3')]);
    expect(store.decisions().map((d) => [d.local_code, d.decision])).toEqual([['L2', 'accept'], ['L1', 'keep'], ['L3', 'accept']]);
  });

  it('refuses a damaged index, a run file that does not match its hash, and another format version', () => {
    const dir = tempDir();
    const store = StateStore.open(dir);
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'ok', 0.9, 0.9, 0, '']]));
    const runFile = join(dir, store.runs[0].file);
    writeFileSync(runFile, readFileSync(runFile, 'utf8').replace('"ok"', '"broken"'));
    const e1 = (() => { try { StateStore.open(dir).loadRuns(); } catch (e) { return e as TermdriftError; } })();
    expect(e1?.code).toBe('state_corrupt');
    expect(e1?.location.file).toBe(runFile);
    const index = join(dir, 'index.json');
    const good = readFileSync(index, 'utf8');
    writeFileSync(index, good.slice(0, 40));
    expect(() => StateStore.open(dir)).toThrow(TermdriftError);
    writeFileSync(index, good.replace('"version": 1', '"version": 99'));
    const e3 = (() => { try { StateStore.open(dir); } catch (e) { return e as TermdriftError; } })();
    expect(e3?.code).toBe('state_corrupt');
  });
});

describe('StateStore in a folder it cannot write', () => {
  it('says so, with the fix, and leaves the state as it was', () => {
    const dir = tempDir();
    const store = StateStore.open(dir);
    store.recordRun(run(sha('1'), sha('2'), [['L1', 'x', 'C1', 'ok', 0.9, 0.9, 0, '']]));
    const before = readFileSync(join(dir, 'index.json'), 'utf8');
    // A file where the runs folder should be: writing a run fails the same way for root as for anyone.
    const blocked = tempDir();
    writeFileSync(join(blocked, 'runs'), 'not a folder');
    const err = (() => { try { StateStore.open(blocked).recordRun(run(sha('1'), sha('2'), [])); } catch (e) { return e as TermdriftError; } })();
    expect(err).toBeInstanceOf(TermdriftError);
    expect(err?.code).toBe('file_unreadable');
    expect(err?.fix).toMatch(/--no-state/);
    expect(readFileSync(join(dir, 'index.json'), 'utf8')).toBe(before);
  });
});
