/**
 * The CLI's readable summary of an interpretation: layers, depths under each shot side by each
 * method, fit to the picks, warnings and cautions. Plain text, 100 columns at most, no colour.
 */
import type { Interpretation } from '../lib/interpretation/shape.js';

function fixed(value: number | null | undefined, digits: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '—' : value.toFixed(digits);
}

/**
 * "value ± error" with the error to two significant figures and the value to the same decimal
 * place (the usual way to quote a measurement); `digits` decimals when the error is zero or unknown.
 */
export function plusMinus(value: number | null | undefined, error: number | null | undefined, digits: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '—';
  if (error === null || error === undefined || !Number.isFinite(error) || !(error > 0)) return `${value.toFixed(digits)} ± ${fixed(error, digits)}`;
  const decimals = Math.min(6, Math.max(0, 1 - Math.floor(Math.log10(error))));
  return `${value.toFixed(decimals)} ± ${error.toFixed(decimals)}`;
}

function table(header: readonly string[], rows: readonly (readonly string[])[]): string[] {
  const widths = header.map((title, column) => Math.max(title.length, ...rows.map((row) => (row[column] ?? '').length)));
  const line = (cells: readonly string[]) =>
    '  ' + cells.map((cell, column) => (column === 0 ? cell.padEnd(widths[column]!) : cell.padStart(widths[column]!))).join('   ');
  return [line(header), '  ' + widths.map((width) => '-'.repeat(width)).join('   '), ...rows.map(line)];
}

function wrap(text: string, indent: string, width = 96): string[] {
  // Split at ordinary spaces only: a no-break space keeps a number with its unit.
  const words = text.split(/[ \t\n]+/);
  const lines: string[] = [];
  let current = '';
  for (const word of words) {
    if ((current + ' ' + word).trim().length > width - indent.length && current) {
      lines.push(indent + current);
      current = word;
    } else current = current ? `${current} ${word}` : word;
  }
  if (current) lines.push(indent + current);
  return lines;
}

export function formatSummary(result: Interpretation): string {
  const { units } = result;
  const distanceDigits = units.distance === 'km' ? 2 : 1;
  const timeDigits = units.time === 's' ? 3 : 2;
  const velocityDigits = units.velocity === 'km/s' ? 3 : 0;
  const out: string[] = [];
  out.push(`slopebreak ${result.software.version} · ${result.source ?? 'pick table'}`);
  out.push(
    `${result.summary.shotCount} shots, ${result.summary.pickCount} picks (${result.summary.excludedPickCount} excluded), ` +
      `${result.summary.shotSideCount} shot sides · units ${units.distance}, ${units.time}, ${units.velocity} · fit: ${result.options.fitMethod}`,
  );
  out.push('');
  out.push('LAYERS  (plane horizontal layers; means over the shot sides; ± is one standard error)');
  out.push(
    ...table(
      ['layer', 'phase', `velocity ${units.velocity}`, `thickness ${units.distance}`, `top at depth ${units.distance}`, 'shot sides'],
      result.layers.map((layer) => [
        String(layer.index),
        layer.phase,
        plusMinus(layer.velocity, layer.velocitySE, velocityDigits),
        layer.depthToTop === null ? 'not resolved' : layer.thickness === null ? 'half-space' : plusMinus(layer.thickness, layer.thicknessSE, distanceDigits),
        plusMinus(layer.depthToTop, layer.depthToTopSE, distanceDigits),
        String(layer.shotSides),
      ]),
    ),
  );
  out.push(...earthCurvatureLines(result, { distanceDigits, timeDigits, velocityDigits }));
  out.push(...timeTermLines(result, { distanceDigits, timeDigits, velocityDigits }));
  out.push('');
  out.push(`DEPTH BELOW EACH SHOT  (${units.distance}; interface k = top of layer k+1)`);
  const depthRows: string[][] = [];
  for (const shot of result.shots) {
    for (const side of shot.sides) {
      const interfaces = Math.max(side.depths.interceptTime.length, side.depths.crossoverDistance.length);
      const branches = side.branches.map((branch) => `${branch.index}:${branch.apparentVelocity === null ? '∞' : fixed(branch.apparentVelocity, velocityDigits)}`).join(' ');
      if (interfaces === 0) {
        depthRows.push([shot.id, side.side, fixed(shot.sourceX, distanceDigits), branches, '—', '—', '—', '—']);
      }
      for (let k = 0; k < interfaces; k += 1) {
        const intercept = side.depths.interceptTime[k];
        const crossover = side.depths.crossoverDistance[k];
        const boot = side.depths.bootstrap?.[k];
        depthRows.push([
          k === 0 ? shot.id : '',
          k === 0 ? side.side : '',
          k === 0 ? fixed(shot.sourceX, distanceDigits) : '',
          k === 0 ? branches : '',
          String(k + 1),
          plusMinus(intercept?.depth, intercept?.depthSE, distanceDigits),
          plusMinus(crossover?.depth, crossover?.depthSE, distanceDigits),
          boot ? `${fixed(boot.low95, distanceDigits)}–${fixed(boot.high95, distanceDigits)}` : '—',
        ]);
      }
    }
  }
  const replicates = result.options.bootstrapReplicates;
  out.push(
    ...table(
      ['shot', 'side', `at ${units.distance}`, `branch:apparent ${units.velocity}`, 'iface', 'intercept-time', 'crossover-distance', replicates > 0 ? `bootstrap 95% (${replicates})` : 'bootstrap 95%'],
      depthRows,
    ),
  );
  out.push(
    '  — crossover-distance: no crossover readable from the picks (no direct-wave picks on that side, or branches overlapping);',
    `  — bootstrap: ${replicates > 0 ? 'not computed for that side (its top-layer velocity is borrowed)' : 'not asked for (--bootstrap N)'}`,
  );
  out.push(...reversedProfileLines(result, { distanceDigits, timeDigits, velocityDigits }));
  out.push('');
  const rmsList = result.residuals.perShot.map((entry) => `${entry.shot} ${fixed(entry.rms, timeDigits)}`).join(', ');
  out.push(`FIT TO THE PICKS  RMS of picks − layered model (${units.time}): overall ${fixed(result.residuals.overallRms, timeDigits)}`);
  out.push(...wrap(rmsList, '  '));
  out.push('');
  out.push(`WARNINGS  (${result.warnings.length})`);
  if (result.warnings.length === 0) out.push('  none');
  for (const warning of result.warnings) {
    out.push(...wrap(`[${warning.level}] ${warning.code}: ${warning.message}`, '  ').map((line, k) => (k === 0 ? line : `    ${line.trimStart()}`)));
  }
  out.push('');
  out.push('CAUTIONS');
  for (const caution of result.cautions) {
    out.push(...wrap(`* ${caution}`, '  ').map((line, k) => (k === 0 ? line : `    ${line.trimStart()}`)));
  }
  return out.join('\n') + '\n';
}

/** Stations listed in the time-term block before the rest are counted (a long line has hundreds). */
const TIME_TERM_STATIONS_SHOWN = 40;

/** The time-term block: the refractor velocity, the constraint, shot terms and the depth under each station. */
function timeTermLines(result: Interpretation, digits: Digits): string[] {
  const terms = result.timeTerms;
  if (!terms) return [];
  const { units } = result;
  const out: string[] = [''];
  out.push(`TIME TERMS  (${terms.phase}, branch ${terms.branch}; time-term method; ± is one standard error)`);
  out.push(
    ...wrap(
      `velocity ${plusMinus(terms.velocity, terms.velocitySE, digits.velocityDigits + 1)} ${units.velocity}` +
        (terms.velocity !== terms.lineVelocity ? ` (at the refractor's radius; along the surface ${fixed(terms.lineVelocity, digits.velocityDigits + 1)})` : '') +
        (terms.velocityGradient !== null ? ` · gradient below it ${plusMinus(terms.velocityGradient, terms.velocityGradientSE, 5)} ${units.velocity} per ${units.distance}` : '') +
        ` · ${terms.pickCount} picks, ${terms.rejectedCount} left out · RMS ${fixed(terms.rms, digits.timeDigits)} ${units.time} · reduced χ² ${fixed(terms.reducedChiSquare, 2)}`,
      '  ',
    ),
  );
  out.push(...wrap(`constraint: ${terms.constraint}`, '  '));
  out.push(...wrap(`shots: ${terms.shots.map((shot) => `${shot.id} ${plusMinus(shot.term, shot.termSE, digits.timeDigits)}`).join(', ')} ${units.time}`, '  '));
  const shown = terms.stations.length <= TIME_TERM_STATIONS_SHOWN ? terms.stations : terms.stations.filter((_, k) => k % Math.ceil(terms.stations.length / TIME_TERM_STATIONS_SHOWN) === 0);
  out.push(
    ...table(
      ['station', `at ${units.distance}`, `time term ${units.time}`, 'picks', `depth ${units.distance}`],
      shown.map((station) => [
        station.id,
        fixed(station.position + 0, digits.distanceDigits).replace(/^-(0\.0*)$/, '$1'),
        plusMinus(station.term, station.termSE, digits.timeDigits),
        String(station.picks),
        station.depth === null ? (station.depthNote ?? '—') : plusMinus(station.depth, station.depthSE, digits.distanceDigits),
      ]),
    ).map((line) => `  ${line}`),
  );
  if (shown.length < terms.stations.length) out.push(`  (1 in ${Math.ceil(terms.stations.length / TIME_TERM_STATIONS_SHOWN)} of the ${terms.stations.length} stations shown; --json lists them all)`);
  return out;
}

/** The earth-curvature block: the flat-earth limit, and the sphere-fitted layers with the flat reading's bias. */
function earthCurvatureLines(result: Interpretation, digits: Digits): string[] {
  const curvature = result.earthCurvature;
  if (!curvature) return [];
  const { units } = result;
  const out: string[] = [''];
  // An engineering line is far too short for curvature to matter: say so in one line, in its units.
  if (!curvature.applied && curvature.choice === 'auto' && units.scale === 'engineering' && curvature.sphericalLayers.length === 0) {
    const limit = curvature.flatErrorOffset === null ? 'at no offset' : `only beyond ${fixed(curvature.flatErrorOffset / 1000, 0)} km`;
    out.push(`EARTH CURVATURE  flat earth: the longest offset is ${fixed(curvature.maxOffset, digits.distanceDigits)} ${units.distance}; a flat earth would err by the pick sigma ${limit}`);
    return out;
  }
  out.push(`EARTH CURVATURE  ${curvature.applied ? 'spherical earth' : 'flat earth'} (asked: ${curvature.choice})`);
  out.push(...wrap(curvature.reason, '  '));
  out.push(
    ...wrap(
      `flat-earth error of the deepest branch: ${fixed(curvature.flatErrorAtMaxOffset, digits.timeDigits)} ${units.time} at the longest offset ${fixed(curvature.maxOffset, digits.distanceDigits)} ${units.distance}; ` +
        (curvature.flatErrorOffset === null ? 'within the pick sigma at every offset' : `passes the pick sigma ${fixed(curvature.pickSigma, digits.timeDigits)} ${units.time} at ${fixed(curvature.flatErrorOffset, digits.distanceDigits)} ${units.distance}`),
      '  ',
    ),
  );
  if (curvature.sphericalLayers.length > 0) {
    out.push(`  layers refit in a sphere of radius ${fixed(curvature.radius, 1)} ${units.distance}${curvature.applied ? ' (use these)' : ' (for comparison; not applied)'}:`);
    out.push(
      ...table(
        ['layer', 'phase', `velocity ${units.velocity}`, `thickness ${units.distance}`, `top at depth ${units.distance}`, `flat − sphere ${units.velocity}`, `flat − sphere ${units.distance}`],
        curvature.sphericalLayers.map((layer, k) => [
          String(layer.index),
          layer.phase,
          plusMinus(layer.velocity, layer.velocitySE, digits.velocityDigits + 1),
          layer.thickness === null ? 'half-space' : plusMinus(layer.thickness, layer.thicknessSE, digits.distanceDigits),
          plusMinus(layer.depthToTop, layer.depthToTopSE, digits.distanceDigits),
          fixed(curvature.flatBias?.velocity[k] ?? null, digits.velocityDigits + 1),
          k === 0 ? '—' : fixed(curvature.flatBias?.depth[k - 1] ?? null, digits.distanceDigits + 1),
        ]),
      ).map((line) => `  ${line}`),
    );
    if (curvature.fit) out.push(`  sphere fit: ${curvature.fit.pickCount} picks, RMS ${fixed(curvature.fit.rms, digits.timeDigits)} ${units.time}, ${curvature.fit.iterations} iterations${curvature.fit.converged ? '' : ', NOT converged'}`);
  }
  return out;
}

interface Digits {
  readonly distanceDigits: number;
  readonly timeDigits: number;
  readonly velocityDigits: number;
}

/** Worst receivers of the forward check listed in the summary. */
const WORST_RECEIVERS = 5;
/** Seams listed per depth section in the text report (the JSON has them all). */
const SEAMS_SHOWN = 8;

/** Reversed pairs, dipping layers, the depth section under every receiver and its forward check. */
function reversedProfileLines(result: Interpretation, digits: Digits): string[] {
  const { units } = result;
  const { distanceDigits, timeDigits, velocityDigits } = digits;
  const out: string[] = [];
  if (result.reversedPairs.length === 0) return out;
  out.push('');
  out.push(`REVERSED PAIRS  (refractor n = top of layer n; reciprocal times in ${units.time}; velocities ${units.velocity})`);
  out.push(
    ...table(
      ['pair', 'n', 'A at B', 'B at A', 'misfit', 'plus-minus V', 'GRM V', `GRM XY ${units.distance}`],
      result.reversedPairs.map((pair) => [
        pair.id,
        String(pair.refractor),
        fixed(pair.reciprocalTime.forwardAtReverseShot, timeDigits),
        fixed(pair.reciprocalTime.reverseAtForwardShot, timeDigits),
        pair.reciprocalTime.misfit === null ? 'unchecked' : `${fixed(pair.reciprocalTime.misfit, timeDigits)}${pair.reciprocalTime.exceeds ? ' !' : ''}`,
        plusMinus(pair.plusMinus.velocity, pair.plusMinus.velocitySE, velocityDigits),
        plusMinus(pair.generalizedReciprocal.velocity, pair.generalizedReciprocal.velocitySE, velocityDigits),
        fixed(pair.generalizedReciprocal.optimumXY, distanceDigits),
      ]),
    ),
  );
  if (result.reversedPairs.some((pair) => pair.reciprocalTime.exceeds)) out.push('  ! reciprocal times differ by more than the picks allow (see the warnings)');
  if (result.dippingLayers.length > 0) {
    out.push('');
    out.push(`DIPPING LAYERS UNDER EACH PAIR OF SHOTS  (${units.distance}, ${units.velocity}; dip + deepens from A to B)`);
    const rows: string[][] = [];
    for (const entry of result.dippingLayers) {
      entry.interfaces.forEach((layer, k) => {
        rows.push([
          k === 0 ? `${entry.forwardShot} → ${entry.reverseShot}` : '',
          String(layer.interface),
          plusMinus(layer.trueVelocity, layer.trueVelocitySE, velocityDigits),
          plusMinus(layer.dipDegrees, layer.dipDegreesSE, 1),
          plusMinus(layer.depthUnderForwardShot, layer.depthUnderForwardShotSE, distanceDigits),
          plusMinus(layer.depthUnderReverseShot, layer.depthUnderReverseShotSE, distanceDigits),
        ]);
      });
    }
    out.push(...table(['pair A → B', 'iface', 'true velocity', 'dip °', 'depth under A', 'depth under B'], rows));
  }
  const sections = result.refractors.filter((refractor) => refractor.points.some((point) => point.pair !== null));
  for (const iface of [...new Set(sections.map((section) => section.interface))]) {
    const plus = sections.find((section) => section.interface === iface && section.method.startsWith('plus-minus'));
    const grm = sections.find((section) => section.interface === iface && section.method.startsWith('generalized'));
    const byX = new Map<string, { x: number; plus?: (typeof sections)[number]['points'][number]; grm?: (typeof sections)[number]['points'][number] }>();
    for (const point of plus?.points ?? []) byX.set(point.x.toFixed(6), { ...(byX.get(point.x.toFixed(6)) ?? { x: point.x }), plus: point });
    for (const point of grm?.points ?? []) byX.set(point.x.toFixed(6), { ...(byX.get(point.x.toFixed(6)) ?? { x: point.x }), grm: point });
    const ordered = [...byX.values()].sort((left, right) => left.x - right.x);
    const withElevation = ordered.some((row) => (row.grm?.elevation ?? row.plus?.elevation ?? null) !== null);
    const rows = ordered.map((row) => [
      fixed(row.x, distanceDigits),
      plusMinus(row.plus?.depth, row.plus?.depthSE, distanceDigits),
      plusMinus(row.grm?.depth, row.grm?.depthSE, distanceDigits),
      ...(withElevation ? [fixed(row.grm?.elevation ?? row.plus?.elevation, distanceDigits)] : []),
      row.grm?.pair ?? (row.plus?.pair ? `${row.plus.pair} (plus-minus)` : '—'),
    ]);
    out.push('');
    out.push(`DEPTH SECTION, INTERFACE ${iface}  (top of layer ${iface + 1}; depth below ground under every receiver, ${units.distance})`);
    out.push(...table([`x ${units.distance}`, 'plus-minus', 'GRM', ...(withElevation ? ['refractor elevation'] : []), 'pair'], rows));
    const allSeams = grm?.seams ?? plus?.seams ?? [];
    // A long line has hundreds of seams: the ones whose step stands out most, in x order.
    const stepRatio = (seam: (typeof allSeams)[number]) => (seam.step === null ? -1 : Math.abs(seam.step) / Math.max(seam.stepSE ?? 0, 1e-9));
    const seams = allSeams.length <= SEAMS_SHOWN ? allSeams : [...allSeams].sort((left, right) => stepRatio(right) - stepRatio(left)).slice(0, SEAMS_SHOWN).sort((left, right) => left.x - right.x);
    if (seams.length > 0) {
      out.push(
        allSeams.length > seams.length
          ? `  seams: ${allSeams.length} (the pair changes); the ${seams.length} largest steps in standard errors (step = new pair − old pair where both cover, ${units.distance}; all of them in the JSON):`
          : `  seams (the pair changes; step = new pair − old pair where both cover, ${units.distance}):`,
      );
      out.push(
        ...wrap(
          seams.map((seam) => `${fixed(seam.x, distanceDigits)}: (${seam.fromPair}) to (${seam.toPair}), step ${seam.step === null ? 'no common receivers' : plusMinus(seam.step, seam.stepSE, distanceDigits)}`).join('; '),
          '    ',
        ),
      );
    }
  }
  const check = result.forwardCheck;
  if (check) {
    out.push('');
    out.push(`FORWARD CHECK  picks − times through the ${check.model.includes('plus-minus') ? 'plus-minus' : 'GRM'} section on a ${fixed(check.grid.spacing, distanceDigits + 1)} ${units.distance} grid (${units.time}): overall RMS ${fixed(check.overallRms, timeDigits)}`);
    out.push(...wrap(check.perShot.map((entry) => `${entry.shot} ${fixed(entry.rms, timeDigits)} (mean ${fixed(entry.mean, timeDigits)})`).join(', '), '  '));
    const worst = [...check.perReceiver].filter((entry) => entry.rms !== null).sort((left, right) => (right.rms ?? 0) - (left.rms ?? 0)).slice(0, WORST_RECEIVERS);
    for (const note of check.notes) out.push(...wrap(`grid note: ${note}`, '  '));
    out.push(`  worst receivers: ${worst.map((entry) => `${fixed(entry.receiverX, distanceDigits)} ${units.distance}: ${fixed(entry.rms, timeDigits)}`).join(', ')}`);
  }
  return out;
}
