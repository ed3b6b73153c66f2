/**
 * RowLedger: counts every row of one input file and records each problem as a Diagnostic.
 *
 * Each loader owns one ledger per file. A row is read once (`read`), then either used or
 * rejected exactly once; `finish()` returns the accounting with `used = read - rejected`, so
 * the identity read = used + rejected holds by construction and is checked by tests.
 */
import type { Diagnostic, RowAccounting, RowProblem } from './types.js';

/** Longest value quoted back in a message. */
const QUOTE_MAX = 60;

/** Quote a value for a message, shortened and with control characters made visible. */
export function quoteValue(value: string): string {
  const shown = value.length > QUOTE_MAX ? `${value.slice(0, QUOTE_MAX)}…` : value;
  return JSON.stringify(shown);
}

export class RowLedger {
  readonly file: string;
  read = 0;
  rejected = 0;
  blankLines = 0;
  readonly diagnostics: Diagnostic[] = [];
  /** Lines already rejected, so one row is never rejected twice. */
  private readonly rejectedLines = new Set<number>();

  constructor(file: string) {
    this.file = file;
  }

  /** Reject the row at `line`; returns false if it was already rejected. */
  reject(line: number, column: number, code: RowProblem, message: string, fix: string): boolean {
    if (this.rejectedLines.has(line)) return false;
    this.rejectedLines.add(line);
    this.rejected++;
    this.diagnostics.push({ file: this.file, line, column, severity: 'error', code, message, fix, rejected: true });
    return true;
  }

  /** Record a problem on a row that is still used. */
  warn(line: number, column: number, code: RowProblem, message: string, fix: string): void {
    this.diagnostics.push({ file: this.file, line, column, severity: 'warning', code, message, fix, rejected: false });
  }

  isRejected(line: number): boolean {
    return this.rejectedLines.has(line);
  }

  finish(): RowAccounting {
    this.diagnostics.sort((a, b) => a.line - b.line || a.column - b.column);
    return { file: this.file, read: this.read, used: this.read - this.rejected, rejected: this.rejected, blankLines: this.blankLines };
  }
}
