// Child process for tests/state/crash.test.ts: writes runs into a state folder and reports each
// completed run on stdout. Modes:
//   loop         record runs until killed
//   partial      record two runs, then stop forever halfway through writing the third run file
//   before-index record two runs, then stop forever with the third run's index complete but not renamed
// The built library (dist/) is used: npm test builds before it runs the tests.
import { StateStore } from '../../dist/state/stateStore.js';

const [dir, mode, size] = process.argv.slice(2);
const n = Number(size ?? 2000);

function run(k) {
  const rows = [];
  for (let i = 0; i < n; i++) rows.push([`L${i}`, `label ${i}`, `C${i}`, i % 7 === 0 ? 'drifted' : 'ok', 0.9, Math.round((0.9 - (k % 50) / 100) * 1000) / 1000, i, '']);
  return {
    format: 'termdrift-run',
    version: 1,
    tool: { name: 'termdrift', version: 'test' },
    releases: { old: { label: `v${k}`, sha256: String(k).padStart(64, '0'), path: `v${k}.tsv` }, new: { label: `v${k + 1}`, sha256: String(k + 1).padStart(64, '0'), path: `v${k + 1}.tsv` } },
    inputs: [{ role: 'mappings', path: 'm.tsv', sha256: 'a'.repeat(64) }],
    columns: ['local_code', 'local_label', 'target_id', 'verdict', 'score_old', 'score_new', 'impact', 'settled'],
    rows,
  };
}

const block = () => Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0);
let k = 1;
const plain = StateStore.open(dir);
if (mode === 'loop') {
  for (;;) {
    plain.recordRun(run(k));
    process.stdout.write(`committed ${k}\n`);
    k++;
  }
} else {
  for (; k <= 2; k++) {
    plain.recordRun(run(k));
    process.stdout.write(`committed ${k}\n`);
  }
  let writes = 0;
  const hooks = mode === 'partial'
    ? { afterPartialWrite: () => { process.stdout.write('stopped mid-write\n'); block(); } }
    : { beforeRename: () => { if (++writes === 2) { process.stdout.write('stopped before the index rename\n'); block(); } } };
  StateStore.open(dir, { hooks }).recordRun(run(k));
  process.stdout.write('not reached\n');
}
