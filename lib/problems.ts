/**
 * Problems found in user input (a pick table, an upload, a request).
 *
 * Problems are values, not exceptions: a reader returns every problem it finds, each naming
 * where it is (line and column, 1-based, as an editor shows them), what is wrong and how to fix
 * it. A problem of severity `error` refuses the whole input; `warning` lets it load.
 * Only programming errors throw.
 */
export type Severity = 'error' | 'warning';

export interface Problem {
  /** Stable machine code, e.g. `time-negative`. Never renamed once released. */
  readonly code: string;
  readonly severity: Severity;
  /** 1-based line in the input file; 0 only for a problem with the input as a whole (none yet). */
  readonly line: number;
  /** 1-based column (field position in the CSV row), or null when the problem is the whole line. */
  readonly column: number | null;
  /** Header name of the field concerned, when there is one. */
  readonly field?: string;
  /** What is wrong, naming the thing and the likely cause. */
  readonly message: string;
  /** What the user should do about it. */
  readonly fix: string;
}

/** Either the value, or the problems that refused it (never both a value and an error). */
export type Outcome<T> =
  | { readonly ok: true; readonly value: T; readonly warnings: readonly Problem[] }
  | { readonly ok: false; readonly problems: readonly Problem[] };

/** Format a problem in the project's one grammar: where, what, fix. */
export function formatProblem(problem: Problem): string {
  const where = problem.column === null ? `line ${problem.line}` : `line ${problem.line}, column ${problem.column}`;
  const field = problem.field ? ` (${problem.field})` : '';
  return `${where}${field}: ${problem.message}; ${problem.fix}`;
}
