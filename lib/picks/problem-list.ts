/**
 * The problem list a reader fills: problems sorted by line, then column (a whole-line problem,
 * column null, after the cells of its line; ties keep the order found), capped at `maxProblems`,
 * with one closing entry that counts what was left off.
 *
 * The cap keeps the `maxProblems` problems that sort first, whatever order they were found in
 * (checks across rows run after every row was read, yet their problems sort among the rows'), so
 * every problem left off lies on or after the closing entry's line. A problem that sorts after
 * all listed ones costs one comparison once the list is full, so a million bad rows are counted
 * in linear time.
 */
import type { Problem, Severity } from '../problems.js';
import type { PickTableProblemCode } from './problem-codes.js';

/** Where a problem is: a 1-based line, a 1-based field position or null, and the header name. */
export interface ProblemPlace {
  readonly line: number;
  readonly column: number | null;
  readonly field?: string;
}

/** Negative when `first` sorts before `second`: by line, then column, whole-line problems last. */
function comparePlaces(first: Problem, second: Problem): number {
  if (first.line !== second.line) return first.line - second.line;
  const firstColumn = first.column ?? Infinity;
  const secondColumn = second.column ?? Infinity;
  return firstColumn === secondColumn ? 0 : firstColumn < secondColumn ? -1 : 1;
}

/** "1 column", "4 columns": a count with its noun in the right number. */
export function counted(count: number, singular: string, plural = `${singular}s`): string {
  return `${count} ${count === 1 ? singular : plural}`;
}

export class ProblemList {
  /** The listed problems, kept sorted (see comparePlaces). */
  private readonly listed: Problem[] = [];
  private readonly maxProblems: number;
  private unlisted = 0;
  private unlistedErrors = 0;
  private firstUnlistedLine = Infinity;
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
    const bare: Problem = { code, severity, line: place.line, column: place.column, message, fix };
    const problem = place.field === undefined ? bare : { ...bare, field: place.field };
    const listed = this.listed;
    const last = listed.at(-1);
    if (last === undefined || comparePlaces(last, problem) <= 0) {
      if (listed.length < this.maxProblems) listed.push(problem);
      else this.leaveOff(problem);
      return;
    }
    // Found late but sorting earlier: insert after every listed problem that sorts before or with it.
    let low = 0;
    let high = listed.length;
    while (low < high) {
      const middle = (low + high) >>> 1;
      if (comparePlaces(listed[middle] as Problem, problem) <= 0) low = middle + 1;
      else high = middle;
    }
    listed.splice(low, 0, problem);
    if (listed.length > this.maxProblems) this.leaveOff(listed.pop() as Problem);
  }

  private leaveOff(problem: Problem): void {
    this.unlisted += 1;
    if (problem.severity === 'error') this.unlistedErrors += 1;
    this.firstUnlistedLine = Math.min(this.firstUnlistedLine, problem.line);
  }

  /** The listed problems, followed by the `problems-truncated` entry when some were left off. */
  problems(): Problem[] {
    if (this.unlisted === 0) return [...this.listed];
    const errors = this.unlistedErrors;
    const kinds =
      errors === this.unlisted
        ? counted(this.unlisted, 'more error')
        : errors === 0
          ? counted(this.unlisted, 'more warning')
          : `${this.unlisted} more problems (${errors === 1 ? 'one of them an error' : `${errors} of them errors`})`;
    const closing: Problem = {
      code: 'problems-truncated',
      severity: errors > 0 ? 'error' : 'warning',
      line: this.firstUnlistedLine,
      column: null,
      message: `${kinds} ${this.unlisted === 1 ? 'was' : 'were'} found from this line on and ${this.unlisted === 1 ? 'is' : 'are'} not listed (the list stops at ${this.maxProblems})`,
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
