/**
 * Bounded fuzzing of the table readers with fast-check: the CSV/TSV reader on both paths (the
 * byte reader readTsvBytes and the string path readTable, compared on the same bytes), the
 * SSSOM reader (metadata block + TSV), and the hierarchy and history readers. Inputs are random
 * bytes and random mutations of valid files: inserted quotes, tabs, commas, CR, LF, NUL, bytes
 * that are not valid UTF-8, a byte order mark, deleted and duplicated stretches, truncation. Every
 * input must keep the invariants of inputCheck.ts (no crash, exact accounting, no lost line).
 *
 * FUZZ_RUNS=N raises the number of cases per property (the by-hand runs recorded in
 * docs/RELIABILITY.md); FUZZ_SAVE=1 writes an input that fails into tests/reliability/regressions/
 * so that it becomes a regression file (regressions.test.ts).
 */
import { describe, it } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { createHash } from 'node:crypto';
import type { TableKind } from '../../src/load/index.js';
import { tempDir } from '../helpers/files.js';
import { checkInput } from './inputCheck.js';

const RUNS = Number(process.env.FUZZ_RUNS ?? 150);
/** Per test: room for the by-hand runs of thousands of cases (a release case loads four times). */
const TIMEOUT = Math.max(60_000, RUNS * 100);

function demoHead(file: string, lines: number): Buffer {
  return Buffer.from(readFileSync(join('demo-data', file), 'utf8').split('\n').slice(0, lines).join('\n') + '\n');
}

/** Valid files to mutate, with the name (extension) and kind they are read as. */
const SEEDS: { name: string; kind: TableKind; bytes: Buffer }[] = [
  { name: 'release.tsv', kind: 'release', bytes: demoHead('release-r1.tsv', 25) },
  { name: 'release.csv', kind: 'release', bytes: Buffer.from('concept_id,term,term_type,status\nC1,"Fracture, femur",preferred,active\nC1,Broken femur,synonym,active\nC2,"He said ""ouch""",preferred,inactive\nC3,Lung,preferred,active\n') },
  { name: 'mappings.sssom.tsv', kind: 'mapping', bytes: demoHead('mappings.sssom.tsv', 40) },
  { name: 'mappings.csv', kind: 'mapping', bytes: Buffer.from('local_code,local_label,target_id,relation,usage\nL1,Heart attack,QV10040V,exact,10\nL2,"Asthma, brittle",QV10044D,broad,"1,200"\nL3,Lung,QV10062F,related,3\n') },
  { name: 'mappings.tsv', kind: 'mapping', bytes: demoHead('mappings.tsv', 20) },
  { name: 'hierarchy.tsv', kind: 'hierarchy', bytes: demoHead('hierarchy-r1.tsv', 20) },
  { name: 'history.tsv', kind: 'history', bytes: demoHead('history-r2.tsv', 20) },
];

/** Byte sequences a hostile or broken export may hold. */
const INSERTS = [
  [0x22], [0x22, 0x22], [0x09], [0x2c], [0x0d], [0x0a], [0x0d, 0x0a], [0x00], [0xff], [0xc3], [0xe2, 0x82], [0xed, 0xa0, 0x80], [0xef, 0xbf, 0xbd],
  [0xef, 0xbb, 0xbf], [0x23], [0x20], [0x22, 0x09, 0x22], [0x0a, 0x0a], [0x1f, 0x8b],
].map((b) => Buffer.from(b));

type Op = { op: 'insert'; at: number; what: number } | { op: 'delete'; at: number; length: number } | { op: 'duplicate'; at: number; length: number } | { op: 'truncate'; at: number } | { op: 'flip'; at: number; byte: number };

const opArb: fc.Arbitrary<Op> = fc.oneof(
  { weight: 5, arbitrary: fc.record({ op: fc.constant('insert' as const), at: fc.nat(), what: fc.nat({ max: INSERTS.length - 1 }) }) },
  { weight: 1, arbitrary: fc.record({ op: fc.constant('delete' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 40 }) }) },
  { weight: 1, arbitrary: fc.record({ op: fc.constant('duplicate' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 80 }) }) },
  { weight: 1, arbitrary: fc.record({ op: fc.constant('truncate' as const), at: fc.nat() }) },
  { weight: 1, arbitrary: fc.record({ op: fc.constant('flip' as const), at: fc.nat(), byte: fc.nat({ max: 255 }) }) },
);

function mutate(bytes: Buffer, ops: Op[]): Buffer {
  let b = bytes;
  for (const o of ops) {
    const at = b.length === 0 ? 0 : o.at % (b.length + 1);
    switch (o.op) {
      case 'insert':
        b = Buffer.concat([b.subarray(0, at), INSERTS[o.what], b.subarray(at)]);
        break;
      case 'delete':
        b = Buffer.concat([b.subarray(0, at), b.subarray(at + o.length)]);
        break;
      case 'duplicate':
        b = Buffer.concat([b.subarray(0, at + o.length), b.subarray(at, at + o.length), b.subarray(at + o.length)]);
        break;
      case 'truncate':
        b = b.subarray(0, at);
        break;
      case 'flip':
        if (at < b.length) b = Buffer.concat([b.subarray(0, at), Buffer.from([o.byte]), b.subarray(at + 1)]);
        break;
    }
  }
  return b;
}

/** Run one input through the checks; with FUZZ_SAVE=1 keep a failing input as a regression file. */
async function fuzzOne(dir: string, name: string, kind: TableKind, bytes: Buffer): Promise<void> {
  try {
    await checkInput(dir, name, kind, bytes);
  } catch (err) {
    if (process.env.FUZZ_SAVE) {
      const id = createHash('sha256').update(bytes).digest('hex').slice(0, 10);
      writeFileSync(join('tests/reliability/regressions', `${kind}-fuzz-${id}-${name}`), bytes);
    }
    throw err;
  }
}

describe('fuzzing the readers (fast-check)', () => {
  it.each(SEEDS.map((s) => [s.name, s] as const))('mutations of a valid %s', async (_n, seed) => {
    const dir = tempDir('termdrift-fuzz-');
    await fc.assert(
      fc.asyncProperty(fc.array(opArb, { minLength: 1, maxLength: 8 }), async (ops) => {
        await fuzzOne(dir, seed.name, seed.kind, mutate(seed.bytes, ops));
      }),
      { numRuns: RUNS },
    );
  }, TIMEOUT);

  it.each([
    ['release', 'random.tsv'],
    ['release', 'random.csv'],
    ['mapping', 'random.sssom.tsv'],
    ['hierarchy', 'random.tsv'],
  ] as const)('random bytes read as a %s (%s)', async (kind, name) => {
    const dir = tempDir('termdrift-fuzz-');
    // Mostly text-like bytes (so that a header is found and rows are read), some of anything.
    const byte = fc.oneof({ weight: 6, arbitrary: fc.constantFrom(0x09, 0x0a, 0x0d, 0x22, 0x2c, 0x23, 0x61, 0x62, 0x43, 0x31, 0x20) }, { weight: 1, arbitrary: fc.integer({ min: 0, max: 255 }) });
    const header = kind === 'release' ? 'concept_id\tterm\tstatus\n' : kind === 'hierarchy' ? 'concept_id\tparent_id\n' : '#curie_map:\n#  C: https://example.org/c/\nsubject_id\tobject_id\tpredicate_id\n';
    const headerCsv = header.replace(/\t/g, ',');
    await fc.assert(
      fc.asyncProperty(fc.boolean(), fc.array(byte, { maxLength: 400 }), async (withHeader, body) => {
        const head = withHeader ? Buffer.from(name.endsWith('.csv') ? headerCsv : header) : Buffer.alloc(0);
        await fuzzOne(dir, name, kind, Buffer.concat([head, Buffer.from(body)]));
      }),
      { numRuns: RUNS },
    );
  }, TIMEOUT);

  it('gzip: a valid compressed release, truncated or damaged anywhere', async () => {
    const { gzipSync } = await import('node:zlib');
    const dir = tempDir('termdrift-fuzz-');
    const gz = gzipSync(demoHead('release-r1.tsv', 60));
    await fc.assert(
      fc.asyncProperty(fc.array(opArb, { minLength: 1, maxLength: 3 }), async (ops) => {
        await fuzzOne(dir, 'release.tsv.gz', 'release', mutate(gz, ops));
      }),
      { numRuns: Math.ceil(RUNS / 3) },
    );
  }, TIMEOUT);
});
