/**
 * DecisionError: the problems that stop `apply`, all of them at once. `apply` checks every row of
 * the worklist before it writes anything; if any row has a problem, nothing is written and this
 * error lists each problem with file, line, column, what is wrong and how to fix it.
 */
import { TermdriftError } from '../errors.js';

/** Stable codes of the problems a worklist can have (tests check these, not the wording). */
export const DECISION_PROBLEMS = [
  'unreadable_row',
  'empty_local_code',
  'unknown_mapping',
  'unknown_decision',
  'duplicate_decision',
  'no_proposed_target',
  'missing_new_target',
  'target_not_in_release',
  'target_inactive',
  'contradictory_target',
  'duplicate_result',
  'release_mismatch',
  'bad_time',
] as const;
export type DecisionProblemCode = (typeof DECISION_PROBLEMS)[number];

export interface DecisionProblem {
  file: string;
  line: number;
  column: number;
  code: DecisionProblemCode;
  message: string;
  fix: string;
}

export class DecisionError extends TermdriftError {
  readonly problems: DecisionProblem[];
  constructor(problems: DecisionProblem[]) {
    const sorted = [...problems].sort((a, b) => a.line - b.line || a.column - b.column);
    const first = sorted[0];
    super('bad_decision', `${first.message}`, { location: { file: first.file, line: first.line, column: first.column }, fix: first.fix });
    this.problems = sorted;
  }

  /** Every problem, one `file:line:column: message` line and one `fix:` line each, then the count. */
  override describe(): string {
    const lines = this.problems.map((p) => `${p.file}:${p.line}:${p.column}: ${p.message}\n  fix: ${p.fix}`);
    const n = this.problems.length;
    return `${lines.join('\n')}\n${n} problem${n === 1 ? '' : 's'}; nothing was written`;
  }
}
