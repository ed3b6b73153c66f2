/**
 * --fail-on: the verdict level at which `check` exits 1, for schedulers and CI pipelines.
 * Order, most severe first: broken > drifted > ambiguous > redirect > context_changed > ok.
 * unknown_target (a mapping to a concept the old release does not have) ranks with broken:
 * such a mapping resolves to nothing today.
 */
import type { Verdict } from '../rescore/types.js';
import { UsageError } from '../errors.js';

export const FAIL_LEVELS = ['broken', 'drifted', 'ambiguous', 'redirect', 'context_changed', 'ok'] as const;
export type FailLevel = (typeof FAIL_LEVELS)[number];

const SEVERITY: Record<Verdict, number> = {
  unknown_target: 5,
  broken: 5,
  drifted: 4,
  ambiguous: 3,
  redirect: 2,
  context_changed: 1,
  ok: 0,
};

export function parseFailOn(value: string | undefined): FailLevel | undefined {
  if (value === undefined) return undefined;
  if (!(FAIL_LEVELS as readonly string[]).includes(value)) {
    throw new UsageError(`--fail-on must be one of ${FAIL_LEVELS.join(', ')}; got "${value}"`, 'e.g. --fail-on broken');
  }
  return value as FailLevel;
}

/** Does a mapping with this verdict reach the level? */
export function reaches(verdict: Verdict, level: FailLevel): boolean {
  return SEVERITY[verdict] >= SEVERITY[level];
}

/** How many verdicts reach the level (0 = the level was not reached). */
export function countReaching(verdicts: Iterable<Verdict>, level: FailLevel): number {
  let n = 0;
  for (const v of verdicts) if (reaches(v, level)) n++;
  return n;
}
