/**
 * Warnings from the reciprocal times of reversed pairs (`interpretation/reversed-pairs.ts`).
 *
 * Each pair whose t_AB and t_BA differ by more than the picks allow gets a `reciprocal-time-misfit`
 * warning naming both shots, the refractor, both times and the misfit. Then the shots are weighed
 * (common practice: a time-zero error of one shot spoils every pair it takes part in, on every
 * refractor, by the same amount and no other pair): a shot whose every checked pair misfits, in at
 * least two pairs, with its lateness of one sign, while every misfitting pair contains such a shot,
 * is named by a `reciprocal-time-shot-suspect` warning with its mean lateness (positive: its times
 * are late). One misfitting pair alone names no shot: either could be at fault.
 */
import type { ReversedPair } from '../interpretation/reversed-pairs.js';
import type { InterpretationWarning } from './warning.js';
import { formatQuantity } from './wording.js';

const ms = (seconds: number) => formatQuantity(seconds * 1000, 'ms', 3);

function readingWords(pair: ReversedPair): string {
  const parts: string[] = [];
  if (pair.forwardAtReverseShot) parts.push(`${pair.forward.shot} at ${pair.reverse.shot} ${ms(pair.forwardAtReverseShot.value)}`);
  if (pair.reverseAtForwardShot) parts.push(`${pair.reverse.shot} at ${pair.forward.shot} ${ms(pair.reverseAtForwardShot.value)}`);
  return parts.join(', ');
}

export function reciprocalTimeWarnings(pairs: readonly ReversedPair[]): InterpretationWarning[] {
  const warnings: InterpretationWarning[] = [];
  const checked = pairs.filter((pair) => pair.check !== null);
  for (const pair of checked) {
    const check = pair.check!;
    if (!check.exceeds) continue;
    warnings.push({
      code: 'reciprocal-time-misfit',
      level: 'warning',
      message: `shots ${pair.forward.shot} and ${pair.reverse.shot}, refractor ${pair.refractor}: the reciprocal times differ by ${ms(Math.abs(check.misfit))} (${readingWords(pair)}), more than the ${ms(check.limit)} the picks allow; one shot's time zero (trigger delay), a wrong shot or receiver position, or branches of different refractors — the delay-time depths of this pair are unreliable until it is found`,
      shot: pair.forward.shot,
      layer: pair.refractor,
      details: {
        forwardShot: pair.forward.shot,
        reverseShot: pair.reverse.shot,
        misfit: check.misfit,
        limit: check.limit,
      },
    });
  }

  // Per shot: its checked pairs, how many misfit, and its lateness in each (t_AB − t_BA counts for A, against B).
  const tally = new Map<string, { checked: number; misfits: number; lateness: number[] }>();
  const entry = (shot: string) => {
    let found = tally.get(shot);
    if (!found) tally.set(shot, (found = { checked: 0, misfits: 0, lateness: [] }));
    return found;
  };
  for (const pair of checked) {
    const { misfit, exceeds } = pair.check!;
    for (const [shot, sign] of [[pair.forward.shot, 1], [pair.reverse.shot, -1]] as const) {
      const record = entry(shot);
      record.checked += 1;
      if (exceeds) {
        record.misfits += 1;
        record.lateness.push(sign * misfit);
      }
    }
  }
  const failing = checked.filter((pair) => pair.check!.exceeds);
  if (failing.length === 0) return warnings;
  const suspects = [...tally.entries()]
    .filter(([, record]) => record.misfits >= 2 && record.misfits === record.checked)
    .filter(([, record]) => record.lateness.every((value) => value > 0) || record.lateness.every((value) => value < 0))
    .map(([shot]) => shot);
  const explained = failing.every((pair) => suspects.includes(pair.forward.shot) || suspects.includes(pair.reverse.shot));
  if (!explained) return warnings;
  for (const shot of suspects) {
    const record = tally.get(shot)!;
    const lateness = record.lateness.reduce((sum, value) => sum + value, 0) / record.lateness.length;
    warnings.push({
      code: 'reciprocal-time-shot-suspect',
      level: 'warning',
      message: `shot ${shot}: every reversed pair it takes part in misfits its reciprocal time (${record.misfits} of ${record.checked}; its times are ${lateness >= 0 ? 'late' : 'early'} by ${ms(Math.abs(lateness))} on average) while the other pairs agree; its time zero (trigger delay) or its source position is the likely cause — check them, or exclude the shot`,
      shot,
      details: { pairs: record.checked, misfits: record.misfits, lateness },
    });
  }
  return warnings;
}
