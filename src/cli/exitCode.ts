/**
 * Exit codes, as a pure function of what happened (the CLI sets process.exitCode from it).
 * 0 success; 1 findings at or above the --fail-on level; 2 bad input or usage.
 */
export const EXIT = { ok: 0, findings: 1, badInput: 2 } as const;
export type ExitCode = (typeof EXIT)[keyof typeof EXIT];

export interface RunOutcome {
  /** A usage or structural input error stopped the run. */
  error?: boolean;
  /** Rows were rejected (validate treats this as bad input). */
  rejectedRows?: number;
  /** The --fail-on level was reached. */
  failOnReached?: boolean;
  /** validate: rejected rows make the exit code 2. */
  strictRows?: boolean;
}

export function exitCodeFor(outcome: RunOutcome): ExitCode {
  if (outcome.error) return EXIT.badInput;
  if (outcome.strictRows && (outcome.rejectedRows ?? 0) > 0) return EXIT.badInput;
  if (outcome.failOnReached) return EXIT.findings;
  return EXIT.ok;
}
