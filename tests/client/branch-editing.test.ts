/**
 * The browser client's branch editing (client/src/branch-editing.ts), checked against the
 * project's own engine as the oracle: every edit list the client builds is applied with
 * lib's `applyBranchEdits` and the pick set re-interpreted with lib's `interpret`, exactly as the
 * service does (server/routes/current-picks.ts applies stored edits in order, then interprets).
 * Branch memberships are read from lib's interpretation by this file's own walker, not by the
 * client's `placesByLine`.
 *
 * Input: the bundled demo survey sample-surveys/millbrook-quarry-bedrock.csv (invented data).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { interpret } from '../../lib/interpret.js';
import { applyBranchEdits, type BranchEdit } from '../../lib/branches/edits.js';
import type { Interpretation as EngineInterpretation } from '../../lib/interpretation/shape.js';
import type { Interpretation, StoredPick } from '../../client/src/api-types.js';
import {
  assignmentEdits,
  breakpointEdits,
  breakpointsOf,
  effectiveEdits,
  indexByLine,
  inverseEdits,
  placesByLine,
  sideOfStoredPick,
  type Breakpoint,
} from '../../client/src/branch-editing.js';
import { applied, asClient, engineView, readTable, SAMPLE_TEXT } from './engine-inputs.js';

// ---------------------------------------------------------------- the engine as oracle





interface Membership {
  readonly side: string;
  readonly branch: number;
  readonly offset: number;
}

/** Every table line on a branch of lib's interpretation, with its side ("shot/side") and branch. */
function memberships(result: EngineInterpretation): Map<number, Membership> {
  const found = new Map<number, Membership>();
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      for (const branch of side.branches) {
        for (const pick of branch.picks) found.set(pick.line, { side: `${shot.id}/${side.side}`, branch: branch.index, offset: pick.offset });
      }
    }
  }
  return found;
}

function sideOf(result: EngineInterpretation, shot: string, sideName: 'forward' | 'reverse') {
  const side = result.shots.find((candidate) => candidate.id === shot)?.sides.find((candidate) => candidate.side === sideName);
  if (!side) throw new Error(`the sample has no ${sideName} side of shot ${shot}`);
  return side;
}

const SAMPLE = readTable(SAMPLE_TEXT);
const PICKS: readonly StoredPick[] = SAMPLE.picks;
const BASE = engineView(SAMPLE);
const BASE_MEMBERS = memberships(BASE);
const lineIndex = (line: number): number => {
  const index = PICKS.findIndex((pick) => pick.line === line);
  if (index < 0) throw new Error(`no pick on table line ${line}`);
  return index;
};

/** Lines of one side's branch in lib's baseline interpretation, in offset order. */
function branchLines(shot: string, side: 'forward' | 'reverse', branch: number): number[] {
  const found = sideOf(BASE, shot, side).branches.find((candidate) => candidate.index === branch);
  if (!found) throw new Error(`shot ${shot} ${side} has no branch ${branch}`);
  return found.picks.map((pick) => pick.line);
}

/** The last pick of branch 1 on shot A-W forward (the automatic split puts it at 6 m). */
const LAST_DIRECT_AW = branchLines('A-W', 'forward', 1).at(-1)!;

// ---------------------------------------------------------------- tests

describe('branch-editing: the sample as the engine splits it', () => {
  it('the sample survey is split automatically on every side, with A-W forward in branches 1, 2, 3 (precondition of the tests below)', () => {
    // Source: lib's interpret on the bundled demo survey.
    expect(BASE.shots.flatMap((shot) => shot.sides.map((side) => side.assignedBy))).toEqual(Array(6).fill('automatic'));
    expect(sideOf(BASE, 'A-W', 'forward').branches.map((branch) => branch.index)).toEqual([1, 2, 3]);
    expect(BASE_MEMBERS.get(LAST_DIRECT_AW)).toEqual({ side: 'A-W/forward', branch: 1, offset: 6 });
  });

  it('sideOfStoredPick says forward beyond the source, reverse before it, null at it (the side rule of lib/branches/sides.ts)', () => {
    const pick = PICKS[0]!;
    expect(sideOfStoredPick({ ...pick, sourceX: 0, receiverX: 3 })).toBe('forward');
    expect(sideOfStoredPick({ ...pick, sourceX: 0, receiverX: -3 })).toBe('reverse');
    expect(sideOfStoredPick({ ...pick, sourceX: 5, receiverX: 5 })).toBeNull();
    // Oracle: every sample pick on a branch of lib's interpretation is on the side lib put it.
    for (const pick of PICKS) expect(`${pick.shot}/${sideOfStoredPick(pick)}`).toBe(BASE_MEMBERS.get(pick.line)?.side);
  });

  it('placesByLine and indexByLine name every branch pick of the interpretation and every stored pick by table line', () => {
    const places = placesByLine(asClient(BASE));
    // Oracle: this file's walker over lib's interpretation.
    expect(places.size).toBe(BASE_MEMBERS.size);
    for (const [line, member] of BASE_MEMBERS) {
      const place = places.get(line);
      expect(place && { side: `${place.shot}/${place.side}`, branch: place.branch, offset: place.offset }).toEqual(member);
    }
    const index = indexByLine(PICKS);
    expect(index.size).toBe(PICKS.length);
    PICKS.forEach((pick, position) => expect(index.get(pick.line)).toBe(position));
  });
});

describe('assignmentEdits', () => {
  it('assignmentEdits moving one pick of an automatic side to branch 2 freezes the side: after lib applies the edits, only that pick changes branch, on every side', () => {
    const edits = assignmentEdits(asClient(BASE), PICKS, [LAST_DIRECT_AW], 2);
    // The side's 48 picks frozen with their current branch, then the user's edit last.
    expect(edits).toHaveLength(49);
    expect(edits.at(-1)).toEqual({ pickIndex: lineIndex(LAST_DIRECT_AW), assign: 2 });
    expect(new Set(edits.map((edit) => PICKS[edit.pickIndex]?.shot))).toEqual(new Set(['A-W']));

    // Oracle: lib's applyBranchEdits + interpret, as the service stores and shows them.
    const after = engineView(applied(SAMPLE, edits));
    const afterMembers = memberships(after);
    expect(afterMembers.get(LAST_DIRECT_AW)?.branch).toBe(2);
    expect(afterMembers.size).toBe(BASE_MEMBERS.size);
    for (const [line, member] of BASE_MEMBERS) {
      if (line === LAST_DIRECT_AW) continue;
      expect(afterMembers.get(line), `table line ${line}`).toEqual(member);
    }
    expect(sideOf(after, 'A-W', 'forward').assignedBy).toBe('user');
    expect(after.shots.flatMap((shot) => shot.sides.filter((side) => shot.id !== 'A-W').map((side) => side.assignedBy))).toEqual(Array(5).fill('automatic'));
  });

  it('without the freeze, the same single edit makes lib drop the whole split of A-W forward (why assignmentEdits freezes sides)', () => {
    // Oracle: lib's user-branch rule (lib/branches/user-branches.ts): one labelled pick decides the
    // side; branch 2 with one pick cannot be fitted, so no branch line exists for the others to join.
    const after = engineView(applied(SAMPLE, [{ pickIndex: lineIndex(LAST_DIRECT_AW), assign: 2 }]));
    const side = sideOf(after, 'A-W', 'forward');
    expect(side.assignedBy).toBe('user');
    expect(side.branches).toEqual([]);
    const changed = [...BASE_MEMBERS].filter(([line, member]) => member.side === 'A-W/forward' && line !== LAST_DIRECT_AW && memberships(after).get(line)?.branch !== member.branch);
    expect(changed).toHaveLength(47);
  });

  it("assignmentEdits with 'exclude' on picks of two sides freezes both sides; after lib, the excluded picks are on no branch and every other pick keeps its branch", () => {
    const selection = [branchLines('A-W', 'forward', 2)[3]!, branchLines('A-E', 'reverse', 3)[10]!, branchLines('A-E', 'reverse', 1)[0]!];
    const edits = assignmentEdits(asClient(BASE), PICKS, selection, 'exclude');
    expect(edits.filter((edit) => edit.assign === 'exclude').map((edit) => PICKS[edit.pickIndex]?.line)).toEqual(selection);

    const pickSet = applied(SAMPLE, edits);
    const after = engineView(pickSet);
    const afterMembers = memberships(after);
    for (const line of selection) {
      expect(afterMembers.has(line), `excluded table line ${line} is on a branch`).toBe(false);
      expect(pickSet.picks[lineIndex(line)]?.excluded).toBe(true);
    }
    expect(after.summary.excludedPickCount).toBe(selection.length);
    for (const [line, member] of BASE_MEMBERS) {
      if (!selection.includes(line)) expect(afterMembers.get(line), `table line ${line}`).toEqual(member);
    }
  });

  it("assignmentEdits with 'automatic' adds no freeze edits: one edit per chosen pick, in selection order", () => {
    const selection = [LAST_DIRECT_AW, branchLines('A-MID', 'reverse', 2)[0]!];
    expect(assignmentEdits(asClient(BASE), PICKS, selection, 'automatic')).toEqual(
      selection.map((line) => ({ pickIndex: lineIndex(line), assign: 'automatic' })),
    );
  });

  it('assignmentEdits does not freeze a side that the user labels already: one edit only', () => {
    const frozenSet = applied(SAMPLE, assignmentEdits(asClient(BASE), PICKS, [LAST_DIRECT_AW], 2));
    const frozen = engineView(frozenSet);
    expect(sideOf(frozen, 'A-W', 'forward').assignedBy).toBe('user');
    const line = branchLines('A-W', 'forward', 3)[0]!;
    expect(assignmentEdits(asClient(frozen), frozenSet.picks, [line], 2)).toEqual([{ pickIndex: lineIndex(line), assign: 2 }]);
  });

  it('assignmentEdits gives no edits for an empty selection or lines not in the stored picks, and one edit for a line chosen twice', () => {
    expect(assignmentEdits(asClient(BASE), PICKS, [], 2)).toEqual([]);
    expect(assignmentEdits(asClient(BASE), PICKS, [999_999], 2)).toEqual([]);
    const edits = assignmentEdits(asClient(BASE), PICKS, [LAST_DIRECT_AW, LAST_DIRECT_AW, 999_999], 'automatic');
    expect(edits).toEqual([{ pickIndex: lineIndex(LAST_DIRECT_AW), assign: 'automatic' }]);
  });
});

describe('breakpointsOf', () => {
  it("breakpointsOf lists each side's consecutive branch pairs with the offsets either side: the same pairs and brackets as lib's crossovers", () => {
    // Oracle: lib lists a crossover per consecutive branch pair with observedBracket
    // [last offset of the lower branch, first offset of the upper] (lib/interpretation/present.ts).
    const expected: Breakpoint[] = BASE.shots.flatMap((shot) =>
      shot.sides.flatMap((side) =>
        side.crossovers.map((crossover) => ({
          shot: shot.id, side: side.side, lowerBranch: crossover.lowerBranch, upperBranch: crossover.upperBranch,
          lastLowerOffset: crossover.observedBracket[0], firstUpperOffset: crossover.observedBracket[1],
        })),
      ),
    );
    expect(expected).toHaveLength(10);
    expect(breakpointsOf(asClient(BASE))).toEqual(expected);
  });

  it('breakpointsOf orders branches by offset, not by the order the interpretation lists them in', () => {
    const reversed: Interpretation = {
      ...BASE,
      shots: BASE.shots.map((shot) => ({ ...shot, sides: shot.sides.map((side) => ({ ...side, branches: [...side.branches].reverse() })) })),
    };
    const aw = breakpointsOf(reversed).filter((breakpoint) => breakpoint.shot === 'A-W');
    expect(aw.map((breakpoint) => [breakpoint.lowerBranch, breakpoint.upperBranch])).toEqual([[1, 2], [2, 3]]);
    for (const breakpoint of breakpointsOf(reversed)) expect(breakpoint.lastLowerOffset).toBeLessThan(breakpoint.firstUpperOffset);
  });
});

describe('breakpointEdits', () => {
  /** Moves a breakpoint of the sample and returns lib's interpretation after the edits. */
  function moved(shot: string, side: 'forward' | 'reverse', lowerBranch: number, offset: number) {
    const breakpoint = breakpointsOf(asClient(BASE)).find((candidate) => candidate.shot === shot && candidate.side === side && candidate.lowerBranch === lowerBranch);
    if (!breakpoint) throw new Error(`no breakpoint after branch ${lowerBranch} on ${shot} ${side}`);
    const edits = breakpointEdits(asClient(BASE), PICKS, breakpoint, offset);
    return { breakpoint, edits, after: memberships(engineView(applied(SAMPLE, edits))) };
  }

  const cases = [
    { shot: 'A-W', side: 'forward', lowerBranch: 2, offset: 16, why: 'earlier, into branch 2' },
    { shot: 'A-W', side: 'forward', lowerBranch: 1, offset: 9.5, why: 'later, into branch 2' },
    { shot: 'A-E', side: 'reverse', lowerBranch: 2, offset: 27, why: 'later, into branch 3' },
  ] as const;

  for (const { shot, side, lowerBranch, offset, why } of cases) {
    it(`breakpointEdits moving the ${lowerBranch}|${lowerBranch + 1} breakpoint of ${shot} ${side} to ${offset} m (${why}) puts exactly the picks of those two branches below it on the lower branch, after lib re-interprets`, () => {
      const { breakpoint, after } = moved(shot, side, lowerBranch, offset);
      // Oracle: lib's applyBranchEdits + interpret; expected memberships from lib's baseline.
      let lower = 0;
      let upper = 0;
      for (const [line, member] of BASE_MEMBERS) {
        const now = after.get(line);
        if (member.side === `${shot}/${side}` && (member.branch === breakpoint.lowerBranch || member.branch === breakpoint.upperBranch)) {
          const expected = member.offset < offset ? breakpoint.lowerBranch : breakpoint.upperBranch;
          expect(now?.branch, `table line ${line} at ${member.offset} m`).toBe(expected);
          if (expected === breakpoint.lowerBranch) lower += 1;
          else upper += 1;
        } else {
          expect(now, `table line ${line} (not on the moved breakpoint)`).toEqual(member);
        }
      }
      expect(lower).toBeGreaterThan(0);
      expect(upper).toBeGreaterThan(0);
    });
  }

  it('breakpointEdits on a side the user labels only in part also fixes the unlabelled picks, so picks of the other branches stay where they were', () => {
    // Label the 2nd and 3rd pick of each branch of A-W forward only: the rest follow the nearest line.
    const side = sideOf(BASE, 'A-W', 'forward');
    const index = indexByLine(PICKS);
    const partial = side.branches.flatMap((branch) => branch.picks.slice(1, 3).map((pick) => ({ pickIndex: index.get(pick.line)!, assign: branch.index })));
    const labelled = applied(SAMPLE, partial);
    const before = engineView(labelled);
    const beforeMembers = memberships(before);
    const breakpoint = breakpointsOf(asClient(before)).find((candidate) => candidate.shot === 'A-W' && candidate.side === 'forward' && candidate.lowerBranch === 1)!;
    const edits = breakpointEdits(asClient(before), labelled.picks, breakpoint, 9);
    const after = memberships(engineView(applied(labelled, edits)));
    // Oracle: lib. Branch 3 of A-W forward is untouched by a 1|2 move, labelled or not.
    const branchThree = [...beforeMembers].filter(([, member]) => member.side === 'A-W/forward' && member.branch === 3);
    expect(branchThree.length).toBeGreaterThan(10);
    for (const [line, member] of branchThree) expect(after.get(line)?.branch, `table line ${line} at ${member.offset} m`).toBe(3);
  });

  it('breakpointEdits gives no edits for a breakpoint of a shot the interpretation does not have', () => {
    const breakpoint = breakpointsOf(asClient(BASE))[0]!;
    expect(breakpointEdits(asClient(BASE), PICKS, { ...breakpoint, shot: 'NO-SUCH-SHOT' }, 10)).toEqual([]);
  });
});

describe('inverseEdits', () => {
  it('inverseEdits undoes an assignment: stored picks → edits → inverse edits gives every pick its branch and exclusion back, excluded and labelled picks included', () => {
    const excludedPlain = branchLines('A-W', 'forward', 3)[5]!;
    const excludedLabelled = branchLines('A-MID', 'forward', 2)[2]!;
    const labelled = branchLines('A-MID', 'forward', 2)[4]!;
    // The stored state before the user's change: one excluded pick, one labelled and excluded, one labelled.
    const before = applied(SAMPLE, [
      { pickIndex: lineIndex(excludedPlain), assign: 'exclude' },
      { pickIndex: lineIndex(excludedLabelled), assign: 2 },
      { pickIndex: lineIndex(excludedLabelled), assign: 'exclude' },
      { pickIndex: lineIndex(labelled), assign: 2 },
    ]);
    const beforeResult = engineView(before);
    const selection = [excludedPlain, excludedLabelled, labelled, LAST_DIRECT_AW];
    const edits = assignmentEdits(asClient(beforeResult), before.picks, selection, 3);
    const after = applied(before, edits);
    expect(after.picks[lineIndex(excludedPlain)]).toMatchObject({ branch: 3, excluded: false });

    const undone = applied(after, inverseEdits(before.picks, edits));
    // Oracle: lib's applyBranchEdits; and lib's interpret gives the same interpretation again.
    expect(undone.picks.map((pick) => [pick.line, pick.branch, pick.excluded])).toEqual(before.picks.map((pick) => [pick.line, pick.branch, pick.excluded]));
    expect(undone.picks[lineIndex(excludedLabelled)]).toMatchObject({ branch: 2, excluded: true });
    expect(engineView(undone)).toEqual(beforeResult);
  });

  it('inverseEdits writes one restore per touched pick, in index order, and skips indices outside the picks', () => {
    const index = lineIndex(LAST_DIRECT_AW);
    const edits: BranchEdit[] = [{ pickIndex: index, assign: 2 }, { pickIndex: 3, assign: 'exclude' }, { pickIndex: index, assign: 3 }, { pickIndex: 10_000, assign: 1 }];
    expect(inverseEdits(PICKS, edits)).toEqual([{ pickIndex: 3, assign: 'automatic' }, { pickIndex: index, assign: 'automatic' }]);
  });
});

describe('effectiveEdits', () => {
  it('effectiveEdits drops edits that leave a pick as it was and keeps the net change of the rest', () => {
    const stored = applied(SAMPLE, [{ pickIndex: 5, assign: 2 }, { pickIndex: 6, assign: 'exclude' }, { pickIndex: 7, assign: 3 }, { pickIndex: 7, assign: 'exclude' }]).picks;
    expect(effectiveEdits(stored, [])).toEqual([]);
    expect(effectiveEdits(stored, [{ pickIndex: 5, assign: 2 }])).toEqual([]);
    expect(effectiveEdits(stored, [{ pickIndex: 4, assign: 2 }, { pickIndex: 4, assign: 'automatic' }])).toEqual([]);
    expect(effectiveEdits(stored, [{ pickIndex: 6, assign: 'exclude' }, { pickIndex: 7, assign: 1 }, { pickIndex: 7, assign: 3 }, { pickIndex: 7, assign: 'exclude' }])).toEqual([]);
    expect(effectiveEdits(stored, [{ pickIndex: 8, assign: 2 }, { pickIndex: 8, assign: 4 }])).toEqual([{ pickIndex: 8, assign: 4 }]);
    expect(effectiveEdits(stored, [{ pickIndex: 6, assign: 1 }])).toEqual([{ pickIndex: 6, assign: 1 }]);
    expect(effectiveEdits(stored, [{ pickIndex: 5, assign: 'exclude' }])).toEqual([{ pickIndex: 5, assign: 2 }, { pickIndex: 5, assign: 'exclude' }]);
    // An index the picks do not have is passed on for the service to name.
    expect(effectiveEdits(stored, [{ pickIndex: 10_000, assign: 2 }])).toEqual([{ pickIndex: 10_000, assign: 2 }]);
  });

  it('effectiveEdits keeps the freeze of an assignment (stored picks are unlabelled) and drops only what changes nothing', () => {
    const edits = assignmentEdits(asClient(BASE), PICKS, [LAST_DIRECT_AW], 2);
    const effective = effectiveEdits(PICKS, edits);
    expect(effective).toHaveLength(48);
    expect(applied(SAMPLE, effective).picks).toEqual(applied(SAMPLE, edits).picks);
  });

  /** Pick indices edited by the property: a few, so the same pick is edited several times. */
  const EDITED = [0, 1, 2, 50, 51, 120, 239] as const;
  const editArbitrary = fc.record({
    pickIndex: fc.constantFrom(...EDITED),
    assign: fc.oneof(fc.integer({ min: 1, max: 4 }), fc.constantFrom<'exclude' | 'automatic'>('exclude', 'automatic')),
  });

  it('effectiveEdits gives the same picks as the raw edit list when lib applies both, with at most two edits per pick and none for unchanged picks (fast-check, fixed seed, 500 runs)', () => {
    fc.assert(
      fc.property(fc.array(editArbitrary, { maxLength: 6 }), fc.array(editArbitrary, { maxLength: 30 }), (history, edits) => {
        // `history` makes a stored state with labelled and excluded picks; `edits` is the user's list.
        const stored = applied(SAMPLE, history);
        const effective = effectiveEdits(stored.picks, edits);
        // Oracle: lib's applyBranchEdits applies both lists to the same stored state.
        const viaRaw = applied(stored, edits).picks;
        expect(applied(stored, effective).picks).toEqual(viaRaw);
        const perPick = new Map<number, number>();
        for (const edit of effective) perPick.set(edit.pickIndex, (perPick.get(edit.pickIndex) ?? 0) + 1);
        for (const [pickIndex, count] of perPick) {
          expect(count).toBeLessThanOrEqual(2);
          const was = stored.picks[pickIndex]!;
          const now = viaRaw[pickIndex]!;
          expect([now.branch, now.excluded], `pick ${pickIndex} is edited but ends as it was`).not.toEqual([was.branch, was.excluded]);
        }
        expect(effectiveEdits(stored.picks, effective)).toEqual(effective);
      }),
      { seed: 4_481_207, numRuns: 500 },
    );
  });
});
