/**
 * rankByImpact: order re-scored mappings by impact (severity weight of the verdict × usage),
 * and group them under the change that caused them.
 *
 * Severity weights (reasoning in docs/THRESHOLDS.md, "Verdicts"): a broken mapping (10) sends
 * records to a concept that no longer exists with no successor; a drifted one (8) silently
 * sends them to a different meaning, barely less harmful and harder to see; an ambiguous one
 * (6) needs a human to choose among successors; an unknown target (5) was already wrong before
 * this release and is not caused by it; a redirect (4) has a safe rewrite that still has to be
 * applied; a changed context (2) keeps the meaning but may move the record in analytics;
 * ok is 0.
 */
import type { Change } from '../classify/types.js';
import { CHANGE_KINDS } from '../classify/types.js';
import type { MappingResult, Verdict } from '../rescore/types.js';

export const SEVERITY: Readonly<Record<Verdict, number>> = {
  broken: 10,
  drifted: 8,
  ambiguous: 6,
  unknown_target: 5,
  redirect: 4,
  context_changed: 2,
  ok: 0,
};

/** Severity weight × usage. Usage below 0 is treated as 0. */
export function impactOf(verdict: Verdict, usage: number, weights: Readonly<Record<Verdict, number>> = SEVERITY): number {
  return weights[verdict] * Math.max(0, usage);
}

/** Code-unit order: the same on every machine and locale. */
const compareText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/**
 * The order of mappings of equal impact, by what they say and never by where their rows sit in
 * the mapping file, so that the same mapping set in another row order gives the same report:
 * local code, then target (a mapping set holds one mapping per local code and target; the
 * loaders reject a second), then local label, verdict, relation, owner and usage, so that the
 * order is total also for results a caller puts together from several sets.
 */
export function compareMappings(a: MappingResult, b: MappingResult): number {
  return (
    compareText(a.local_code, b.local_code) ||
    compareText(a.target_id, b.target_id) ||
    compareText(a.local_label, b.local_label) ||
    compareText(a.verdict, b.verdict) ||
    compareText(a.relation, b.relation) ||
    compareText(a.owner, b.owner) ||
    a.usage - b.usage
  );
}

/** The order of mappings in every list and every form: impact (highest first), then compareMappings. */
export function compareByImpact(a: MappingResult, b: MappingResult): number {
  return b.impact - a.impact || compareMappings(a, b);
}

/**
 * A new array of the results with `impact` recomputed from `weights`, ordered by compareByImpact:
 * impact (highest first), then local code, target and the rest of the mapping (not its line).
 * The input is not modified.
 */
export function rankByImpact(results: readonly MappingResult[], weights: Readonly<Record<Verdict, number>> = SEVERITY): MappingResult[] {
  return results
    .map((r) => ({ ...r, impact: impactOf(r.verdict, r.usage, weights) }))
    .sort(compareByImpact);
}

export interface ChangeWithMappings {
  change: Change;
  /** The mappings this change caused, by impact. */
  mappings: MappingResult[];
  /** Sum of their impacts. */
  impact: number;
}

export interface MappingsByChange {
  /** Changes that touch at least one mapping, by total impact (highest first), then change id. */
  changes: ChangeWithMappings[];
  /** Mappings whose target no change touches, by impact. */
  unchanged: MappingResult[];
  /** Ids of the changes that touch no mapping, in the order of `changes` given. */
  changes_without_mappings: string[];
}

const KIND_RANK = new Map<string, number>(CHANGE_KINDS.map((k, i) => [k, i]));

/**
 * Group mappings under the change that caused them. A mapping touched by several changes goes
 * under the first of its `change_ids` in CHANGE_KINDS order (identifier reuse, retirement,
 * merge, split, … before edits of synonyms), i.e. the most structural one.
 */
export function groupByChange(results: readonly MappingResult[], changes: readonly Change[]): MappingsByChange {
  const byId = new Map(changes.map((c) => [c.id, c]));
  const groups = new Map<string, MappingResult[]>();
  const unchanged: MappingResult[] = [];
  for (const r of results) {
    const known = r.change_ids.filter((id) => byId.has(id));
    if (known.length === 0) {
      unchanged.push(r);
      continue;
    }
    const primary = known.sort((a, b) => KIND_RANK.get(byId.get(a)!.kind)! - KIND_RANK.get(byId.get(b)!.kind)! || (a < b ? -1 : a > b ? 1 : 0))[0];
    const list = groups.get(primary);
    if (list) list.push(r);
    else groups.set(primary, [r]);
  }
  const rank = (list: MappingResult[]) => [...list].sort(compareByImpact);
  const withMappings: ChangeWithMappings[] = [...groups].map(([id, list]) => {
    const mappings = rank(list);
    return { change: byId.get(id)!, mappings, impact: mappings.reduce((s, m) => s + m.impact, 0) };
  });
  withMappings.sort((a, b) => b.impact - a.impact || (a.change.id < b.change.id ? -1 : a.change.id > b.change.id ? 1 : 0));
  const touched = new Set(results.flatMap((r) => r.change_ids));
  return {
    changes: withMappings,
    unchanged: rank(unchanged),
    changes_without_mappings: changes.filter((c) => !touched.has(c.id)).map((c) => c.id),
  };
}
