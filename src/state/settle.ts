/**
 * settleMappings: mark the mappings of a check that a reviewer's earlier decision covers.
 *
 * A mapping (local code → target) is settled by the latest recorded decision on its local code
 * that left it on this target (`keep`: the old target; `accept`, `remap`: the new one) when
 * either the check's new release is the release the decision was made for (the same changes,
 * already reviewed), or no change of this check touches the target (it has not changed again
 * since the decision). A retired mapping is gone from the set, so `retire` settles nothing.
 * The verdict is left as computed; `settled` is a separate field (docs/STATE.md).
 */
import type { MappingResult } from '../rescore/types.js';
import type { DecisionRecord } from './stateStore.js';

export function settleMappings(mappings: MappingResult[], decisions: readonly DecisionRecord[], newReleaseSha256: string): number {
  const byCode = new Map<string, DecisionRecord[]>();
  for (const d of decisions) {
    if (d.decision === 'retire') continue;
    const list = byCode.get(d.local_code);
    if (list) list.push(d);
    else byCode.set(d.local_code, [d]);
  }
  let n = 0;
  for (const m of mappings) {
    const list = byCode.get(m.local_code);
    if (!list) continue;
    let found: DecisionRecord | undefined;
    for (const d of list) {
      const resulting = d.decision === 'keep' ? d.old_target : d.new_target;
      if (resulting === m.target_id) found = d;
    }
    if (!found) continue;
    if (found.release_sha256 !== newReleaseSha256 && m.change_ids.length > 0) continue;
    m.settled = { decision: found.decision as 'accept' | 'keep' | 'remap', reviewer: found.reviewer, note: found.note, release: found.release, time: found.time };
    n++;
  }
  return n;
}
