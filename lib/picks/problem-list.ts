/**
 * The problem list a reader fills: problems in the order found, capped at `maxProblems`, with one
 * closing entry that counts what was found beyond the cap.
 */
import type { Problem, Severity } from '../problems.js';
import type { PickTableProblemCode } from './problem-codes.js';

/** Where a problem is: a 1-based line, a 1-based field position or null, and the header name. */
export interface ProblemPlace {
  readonly line: number;
  readonly column: number | null;
  readonly field?: string;
}

export class ProblemList {
  private readonly listed: Problem[] = [];
  private readonly maxProblems: number;
  private unlisted = 0;
  private unlistedErrors = 0;
  private firstUnlistedLine = 1;
  private errorCount = 0;

  constructor(maxProblems: number) {
    this.maxProblems = maxProblems;
  }

  /** True once any error was added (listed or not). */
  get hasErrors(): boolean {
    return this.errorCount > 0;
  }

  /** Number of errors added so far (listed or not). */
  get errors(): number {
    return this.errorCount;
  }

  error(code: PickTableProblemCode, place: ProblemPlace, message: string, fix: string): void {
    this.add('error', code, place, message, fix);
  }

  warning(code: PickTableProblemCode, place: ProblemPlace, message: string, fix: string): void {
    this.add('warning', code, place, message, fix);
  }

  private add(severity: Severity, code: PickTableProblemCode, place: ProblemPlace, message: string, fix: string): void {
    if (severity === 'error') this.errorCount += 1;
    if (this.listed.length < this.maxProblems) {
      const problem: Problem = { code, severity, line: place.line, column: place.column, message, fix };
      this.listed.push(place.field === undefined ? problem : { ...problem, field: place.field });
      return;
    }
    if (this.unlisted === 0) this.firstUnlistedLine = place.line;
    this.unlisted += 1;
    if (severity === 'error') this.unlistedErrors += 1;
  }

  /** The listed problems, followed by the `problems-truncated` entry when some were left off. */
  problems(): Problem[] {
    if (this.unlisted === 0) return [...this.listed];
    const kinds =
      this.unlistedErrors === this.unlisted
        ? 'errors'
        : this.unlistedErrors === 0
          ? 'warnings'
          : `problems (${this.unlistedErrors} of them errors)`;
    const closing: Problem = {
      code: 'problems-truncated',
      severity: this.unlistedErrors > 0 ? 'error' : 'warning',
      line: this.firstUnlistedLine,
      column: null,
      message: `${this.unlisted} more ${kinds} were found from this line on and are not listed (the list stops at ${this.maxProblems})`,
      fix: 'correct the problems listed and read the table again, or raise maxProblems to see them all',
    };
    return [...this.listed, closing];
  }

  /** Only the warnings listed (for an input that loads). */
  warnings(): Problem[] {
    return this.problems().filter((problem) => problem.severity === 'warning');
  }
}

/** Longest cell text a message repeats; longer text is cut with an ellipsis. */
const SHOWN_TEXT_LENGTH = 40;

/** Cell text as a message quotes it: in quotes, control characters escaped, long text cut. */
export function quoted(text: string): string {
  const cut = text.length > SHOWN_TEXT_LENGTH ? `${text.slice(0, SHOWN_TEXT_LENGTH)}…` : text;
  return JSON.stringify(cut);
}
