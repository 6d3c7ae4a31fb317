/**
 * The problems the SEG-2 reader reports, and the capped list it collects them in.
 *
 * Each problem names the byte offset and the layout field at fault, what is wrong, and what to do.
 * The list keeps problems in the order found (which follows the file's offsets within each pass)
 * and, past `maxProblems`, one closing entry that counts the rest.
 */
import type { Severity } from '../../problems.js';
import type { GatherProblem } from '../gather.js';

/** Stable machine codes of SEG-2 problems. Never renamed once released. */
export type Seg2ProblemCode =
  | 'file-too-large'
  | 'not-seg2'
  | 'file-truncated'
  | 'revision-unexpected'
  | 'trace-count-zero'
  | 'pointer-block-too-small'
  | 'pointer-block-size-odd'
  | 'terminator-length-invalid'
  | 'trace-pointer-past-end'
  | 'trace-pointer-in-file-header'
  | 'trace-block-id-wrong'
  | 'trace-descriptor-too-small'
  | 'trace-descriptor-size-odd'
  | 'trace-descriptor-past-end'
  | 'data-block-past-end'
  | 'data-block-too-small'
  | 'data-block-larger-than-samples'
  | 'format-code-unknown'
  | 'format3-partial-group'
  | 'trace-blocks-overlap'
  | 'string-offset-invalid'
  | 'string-past-block'
  | 'string-unterminated'
  | 'string-nonprinting'
  | 'keyword-prefixed'
  | 'keyword-repeated'
  | 'sample-interval-missing'
  | 'sample-interval-invalid'
  | 'delay-invalid'
  | 'location-invalid'
  | 'units-unknown'
  | 'units-assumed-metres'
  | 'problems-left-off';

/** Where a problem is: a byte offset (null for the whole file) and the field's name. */
export interface Seg2Place {
  readonly byteOffset: number | null;
  readonly field: string;
}

/** Default problem cap: enough to see every kind of fault, short enough to read. */
export const SEG2_DEFAULT_MAX_PROBLEMS = 200;

export class Seg2ProblemList {
  private readonly listed: GatherProblem[] = [];
  private readonly maxProblems: number;
  private unlisted = 0;
  private unlistedErrors = 0;
  private errorCount = 0;

  constructor(maxProblems: number) {
    this.maxProblems = Math.max(1, Math.floor(maxProblems));
  }

  /** True once any error was added (listed or not). */
  get hasErrors(): boolean {
    return this.errorCount > 0;
  }

  error(code: Seg2ProblemCode, place: Seg2Place, message: string, fix: string): void {
    this.add('error', code, place, message, fix);
  }

  warning(code: Seg2ProblemCode, place: Seg2Place, message: string, fix: string): void {
    this.add('warning', code, place, message, fix);
  }

  /** The listed problems, with one closing entry counting those left off. */
  problems(): readonly GatherProblem[] {
    if (this.unlisted === 0) return [...this.listed];
    const errors = this.unlistedErrors;
    const closing: GatherProblem = {
      code: 'problems-left-off',
      severity: errors > 0 ? 'error' : 'warning',
      line: 0,
      column: null,
      byteOffset: null,
      field: 'file',
      message: `${this.unlisted} more problems (${errors} of them errors) were found after these and are not listed`,
      fix: 'fix the problems listed and read the file again to see the rest',
    };
    return [...this.listed, closing];
  }

  private add(severity: Severity, code: Seg2ProblemCode, place: Seg2Place, message: string, fix: string): void {
    if (severity === 'error') this.errorCount += 1;
    if (this.listed.length >= this.maxProblems) {
      this.unlisted += 1;
      if (severity === 'error') this.unlistedErrors += 1;
      return;
    }
    this.listed.push({ code, severity, line: 0, column: null, field: place.field, byteOffset: place.byteOffset, message, fix });
  }
}
