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
      ['layer', `velocity ${units.velocity}`, `thickness ${units.distance}`, `top at depth ${units.distance}`, 'shot sides'],
      result.layers.map((layer) => [
        String(layer.index),
        plusMinus(layer.velocity, layer.velocitySE, velocityDigits),
        layer.depthToTop === null ? 'not resolved' : layer.thickness === null ? 'half-space' : plusMinus(layer.thickness, layer.thicknessSE, distanceDigits),
        plusMinus(layer.depthToTop, layer.depthToTopSE, distanceDigits),
        String(layer.shotSides),
      ]),
    ),
  );
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
