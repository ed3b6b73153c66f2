/**
 * Error classes with stable codes.
 *
 * Three channels carry problems in termdrift (see DEVELOPERS.md):
 *  - usage and structural input errors are thrown as `TermdriftError` subclasses with a stable `code`;
 *  - row-level problems are `Diagnostic`s carried on the load result (see load/types.ts);
 *  - expected outcomes (findings, verdicts) are returned as data, never thrown.
 * The CLI maps every `TermdriftError` to exit code 2 and prints `where: what. fix`.
 */

/** Every stable error code. Tests check errors by code, not by wording. */
export const ERROR_CODES = [
  'usage',
  'file_not_found',
  'file_unreadable',
  'not_a_file',
  'encoding',
  'binary_file',
  'empty_file',
  'header_missing_column',
  'header_duplicate_column',
  'header_empty_column',
  'bad_columns_option',
  'bad_metadata',
  'bad_json',
  'input_too_large',
  'bad_decision',
  'state_corrupt',
] as const;

export type ErrorCode = (typeof ERROR_CODES)[number];

/** Where an error was found; every part optional because some errors concern a whole file. */
export interface Location {
  file?: string;
  line?: number;
  column?: number;
}

/** Base class: a problem the user can fix. `fix` says how. */
export class TermdriftError extends Error {
  readonly code: ErrorCode;
  readonly location: Location;
  readonly fix: string;
  constructor(code: ErrorCode, message: string, options: { location?: Location; fix?: string } = {}) {
    super(message);
    this.name = new.target.name;
    this.code = code;
    this.location = options.location ?? {};
    this.fix = options.fix ?? '';
  }

  /** `file:line:column: message. fix` — the form the CLI prints. */
  describe(): string {
    const { file, line, column } = this.location;
    let where = '';
    if (file !== undefined) {
      where = file;
      if (line !== undefined) where += `:${line}`;
      if (column !== undefined) where += `:${column}`;
      where += ': ';
    }
    return `${where}${this.message}${this.fix ? `\n  fix: ${this.fix}` : ''}`;
  }
}

/** Wrong command-line use: unknown option values, missing arguments. */
export class UsageError extends TermdriftError {
  constructor(message: string, fix = 'run `termdrift --help` for the usage') {
    super('usage', message, { fix });
  }
}

/** A whole input file cannot be used as given (missing, wrong encoding, bad header). */
export class InputError extends TermdriftError {}
