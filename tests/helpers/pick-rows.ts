/**
 * Pick rows in SI (positions m, times s) written as a pick table and interpreted through the whole
 * pipeline, the result checked against the published JSON schema: the shared route of the
 * pipeline tests that build their arrivals from oracles.
 */
import { readPickTable } from '../../lib/picks/index.js';
import { interpret, type InterpretOptions } from '../../lib/interpret.js';
import { InterpretationSchema, type Interpretation } from '../../lib/interpretation/shape.js';

export interface Row {
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  /** s */
  readonly time: number;
  readonly sourceElevation?: number;
  readonly receiverElevation?: number;
  readonly sourceDepth?: number;
  readonly uphole?: number;
}

export function run(rows: readonly Row[], options: InterpretOptions = {}): Interpretation {
  const extra = rows.some((row) => row.sourceElevation !== undefined);
  const buried = rows.some((row) => row.sourceDepth !== undefined);
  const header = ['shot', 'source_x_m', 'receiver_x_m', 'time_ms', ...(extra ? ['source_elev_m', 'receiver_elev_m'] : []), ...(buried ? ['source_depth_m', 'uphole_ms'] : [])];
  const lines = rows.map((row) =>
    [
      row.shot,
      row.sourceX,
      row.receiverX,
      (row.time * 1000).toFixed(4),
      ...(extra ? [row.sourceElevation ?? '', row.receiverElevation ?? ''] : []),
      ...(buried ? [row.sourceDepth ?? 0, row.uphole === undefined ? '' : (row.uphole * 1000).toFixed(4)] : []),
    ].join(','),
  );
  const outcome = readPickTable([header.join(','), ...lines].join('\n'));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  const result = interpret(outcome.value, options);
  InterpretationSchema.parse(result);
  return result;
}

