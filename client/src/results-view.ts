/**
 * The interpretation in words and tables: the layer table (velocity, thickness, depth to top, each
 * ± its standard error, and how each was obtained) with each layer's warnings under it; the shot
 * table (branches with apparent velocity, intercept time and crossovers) with each shot's warnings
 * beside it; the reversed-profile results (reversed pairs, dipping layers, the forward check of
 * the depth section; their rows come from reversed-results.ts); the survey-wide warnings; the
 * standing cautions; the references.
 */
import type { Interpretation, ShotResult, WarningResult } from './api-types.js';
import { branchStyle } from './branch-style.js';
import { h } from './dom.js';
import { branchLabel, plain, quantity, withError } from './format.js';
import { dippingLayerTable, forwardCheckSummary, reversedPairTable, type Cell, type Table } from './reversed-results.js';
import { earthCurvatureSentence, offLineTable, sphericalLayerTable, stationDepthTable, timeTermSentence } from './crustal-results.js';

const LEVEL_WORDS: Record<WarningResult['level'], string> = { caution: 'Caution', warning: 'Warning', info: 'Note' };

/** One warning: its level in words and its message (which names the shot, side, branch or layer itself). */
export function warningItem(warning: WarningResult): HTMLLIElement {
  return h('li', { class: `warning level-${warning.level}`, 'data-code': warning.code, title: `code ${warning.code} (see the README's table of warnings)` },
    h('span', { class: 'warning-level' }, LEVEL_WORDS[warning.level]),
    h('span', { class: 'warning-text' }, warning.message),
  );
}

/** What the three levels mean, once above the lists of warnings. */
export function warningLevelsKey(): HTMLParagraphElement {
  return h('p', { class: 'levels-key' },
    h('span', { class: 'warning-level level-caution-text' }, 'Caution'), ' the result may be wrong in a way the data cannot show; ',
    h('span', { class: 'warning-level level-warning-text' }, 'Warning'), ' a problem seen in the data; ',
    h('span', { class: 'warning-level' }, 'Note'), ' for information.');
}

function warningList(warnings: readonly WarningResult[]): HTMLUListElement | null {
  return warnings.length === 0 ? null : h('ul', { class: 'warnings' }, ...warnings.map(warningItem));
}

/** Branch number chip in its plot colour and marker shape name. */
export function branchChip(index: number, label = branchLabel(index)): HTMLSpanElement {
  const style = branchStyle(index);
  return h('span', { class: 'branch-chip', style: `--branch-color:${style.color};--branch-text:${style.text}`, title: `branch ${index} (${label}): drawn as ${style.symbol}` }, String(index));
}

/** A layer's chip, followed by its phase name on crustal surveys (Pg, P*, Pn). */
export function layerChip(layer: { readonly index: number; readonly phase: string }, scale: string): (HTMLSpanElement | string)[] {
  const chip = branchChip(layer.index, layer.phase);
  return scale === 'crustal' ? [chip, ` ${layer.phase}`] : [chip];
}

export function layerTable(result: Interpretation): HTMLTableElement {
  const { units } = result;
  const layerWarnings = (index: number) => result.warnings.filter((warning) => warning.layer === index && warning.shot === undefined);
  const rows = result.layers.flatMap((layer) => {
    const warnings = layerWarnings(layer.index);
    const row = h('tr', { 'data-layer': layer.index },
      h('th', { scope: 'row' }, ...layerChip(layer, units.scale)),
      h('td', { class: 'number' }, withError(layer.velocity, layer.velocitySE)),
      h('td', { class: 'number' }, layer.thickness === null ? 'half-space' : withError(layer.thickness, layer.thicknessSE)),
      h('td', { class: 'number' }, layer.index === 1 ? '0 (surface)' : withError(layer.depthToTop, layer.depthToTopSE)),
      h('td', { class: 'method' }, h('span', {}, layer.velocityFrom.method), layer.index > 1 ? h('span', { class: 'method-depth' }, layer.depthFrom.method) : null),
    );
    return warnings.length > 0
      ? [row, h('tr', { class: 'row-warnings' }, h('td', { colspan: 5 }, warningList(warnings)))]
      : [row];
  });
  return h('table', { class: 'layer-table', 'aria-label': 'Layers' },
    h('caption', {}, 'Layers (± one standard error)'),
    h('thead', {}, h('tr', {},
      h('th', { scope: 'col' }, 'Layer'),
      h('th', { scope: 'col' }, `Velocity (${units.velocity})`),
      h('th', { scope: 'col' }, `Thickness (${units.distance})`),
      h('th', { scope: 'col' }, `Depth to top (${units.distance})`),
      h('th', { scope: 'col' }, 'How it was obtained'),
    )),
    h('tbody', {}, ...rows),
  );
}

function shotRows(result: Interpretation, shot: ShotResult): HTMLTableRowElement[] {
  const { units } = result;
  const rms = result.residuals.perShot.find((entry) => entry.shot === shot.id)?.rms ?? null;
  const warnings = result.warnings.filter((warning) => warning.shot === shot.id);
  const sides = shot.sides.map((side) => h('tr', { 'data-shot': shot.id, 'data-side': side.side },
    h('th', { scope: 'row' }, `${shot.id}`, h('span', { class: 'side-name' }, ` ${side.side}`)),
    h('td', { class: 'number' }, plain(shot.sourceX, 3)),
    h('td', {}, h('ul', { class: 'branch-list' }, ...side.branches.map((branch) => h('li', {},
      branchChip(branch.index),
      ` ${quantity(branch.apparentVelocity, branch.apparentVelocitySE, units.velocity)}`,
      branch.index > 1 ? `, tᵢ ${quantity(branch.interceptTime, branch.interceptTimeSE, units.time)}` : '',
      h('span', { class: 'pick-count' }, ` (${branch.pickCount} picks${branch.assignedBy === 'user' ? ', assigned by hand' : ''})`),
    )))),
    h('td', {}, ...side.crossovers.map((crossover) => h('div', {},
      `${crossover.lowerBranch}→${crossover.upperBranch}: ${quantity(crossover.fitted, crossover.fittedSE, units.distance)}`,
    ))),
  ));
  const summary = h('tr', { class: 'row-warnings', 'data-shot-warnings': shot.id },
    h('td', { colspan: 4 },
      rms !== null ? h('span', { class: 'shot-rms' }, `RMS of picks against the layer model: ${withError(rms, null)} ${units.time}`) : null,
      warningList(warnings),
    ),
  );
  return [...sides, ...(warnings.length > 0 || rms !== null ? [summary] : [])];
}

export function shotTable(result: Interpretation): HTMLTableElement {
  const { units } = result;
  return h('table', { class: 'shot-table', 'aria-label': 'Shots and branches' },
    h('caption', {}, 'Shots, branches and crossovers'),
    h('thead', {}, h('tr', {},
      h('th', { scope: 'col' }, 'Shot, side'),
      h('th', { scope: 'col' }, `Shot position (${units.distance})`),
      h('th', { scope: 'col' }, 'Branches: apparent velocity, intercept time'),
      h('th', { scope: 'col' }, 'Crossover distance'),
    )),
    h('tbody', {}, ...result.shots.flatMap((shot) => shotRows(result, shot))),
  );
}

export function surveyWarnings(result: Interpretation): HTMLElement {
  const general = result.warnings.filter((warning) => warning.shot === undefined && warning.layer === undefined);
  const layerWide = result.warnings.filter((warning) => warning.shot === undefined && warning.layer !== undefined);
  const all = [...general, ...layerWide.filter((warning) => !result.layers.some((layer) => layer.index === warning.layer))];
  return h('section', { class: 'survey-warnings', 'aria-label': 'Survey warnings' },
    h('h3', {}, 'Warnings about the whole survey'),
    warningLevelsKey(),
    all.length > 0 ? warningList(all) : h('p', { class: 'quiet' }, 'None. Warnings about a layer are listed under it in the layer table, those about a shot beside it in the shot table.'),
  );
}

export function cautionList(cautions: readonly string[], id = 'cautions'): HTMLElement {
  return h('section', { class: 'cautions', id, 'aria-label': 'Cautions' },
    h('h3', {}, 'Read before using these results'),
    h('ul', {}, ...cautions.map((caution) => h('li', {}, caution))),
  );
}

export function referenceList(result: Interpretation): HTMLElement {
  return h('section', { class: 'references', 'aria-label': 'References' },
    h('h3', {}, 'Methods and references'),
    h('ul', {}, ...result.references.map((reference) => h('li', {}, h('span', { class: 'reference-key' }, reference.key), ' ', reference.citation))),
  );
}

// ---------------------------------------------------------------- reversed profiles

/** Footnotes past this many are folded into a "Notes" disclosure on screen (the report prints them all). */
const OPEN_FOOTNOTES = 1;

function cellContent(cell: Cell): (Node | string)[] {
  return [
    ...(cell.chip !== undefined ? [branchChip(cell.chip), ' '] : []),
    h('span', { class: 'cell-main' }, cell.text, cell.mark !== undefined ? h('strong', { class: 'check-mark' }, ` \u26a0\u202f${cell.mark}`) : null),
    ...(cell.details ?? []).map((detail) => h('span', { class: 'cell-detail' }, detail)),
  ];
}

/** A table of reversed-results.ts drawn as HTML: first column row headers, notes under their row, footnotes under the table. */
export function resultTable(table: Table, className: string, printable: boolean): HTMLElement {
  const columnCount = table.columns.length;
  const body = table.rows.flatMap((row) => {
    const cells = row.cells.map((cell, k) => h(k === 0 ? 'th' : 'td', {
      ...(k === 0 ? { scope: 'row' } : {}),
      class: [cell.numeric ? 'number' : null, cell.chip !== undefined ? 'chip-cell' : null, cell.wide ? 'wide-cell' : null].filter(Boolean).join(' ') || null,
      title: cell.title ?? null,
    }, ...cellContent(cell)));
    const tr = h('tr', { 'data-key': row.key, class: row.flagged ? 'flagged' : null }, ...cells);
    return row.notes.length > 0
      ? [tr, h('tr', { class: 'row-warnings row-notes' }, h('td', { colspan: columnCount }, h('ul', { class: 'note-list' }, ...row.notes.map((note) => h('li', {}, note)))))]
      : [tr];
  });
  const element = h('table', { class: `result-table ${className}`, 'aria-label': table.caption },
    h('caption', {}, table.caption),
    h('thead', {}, h('tr', {}, ...table.columns.map((column) => h('th', { scope: 'col' }, column)))),
    h('tbody', {}, ...body),
  );
  if (table.footnotes.length === 0) return element;
  const open = printable ? table.footnotes : table.footnotes.slice(0, OPEN_FOOTNOTES);
  const folded = printable ? [] : table.footnotes.slice(OPEN_FOOTNOTES);
  return h('div', { class: `table-block ${className}-block` }, element,
    h('ul', { class: 'table-notes' }, ...open.map((note) => h('li', {}, note))),
    folded.length > 0 ? h('details', { class: 'table-notes-more' }, h('summary', {}, `Notes (${folded.length})`),
      h('ul', { class: 'table-notes' }, ...folded.map((note) => h('li', {}, note)))) : null,
  );
}

/** The forward check of the depth section: overall RMS, each shot's RMS and mean, the worst receivers, the notes. */
export function forwardCheckBlock(result: Interpretation): HTMLElement | null {
  const summary = forwardCheckSummary(result);
  if (!summary) return null;
  return h('section', { class: 'forward-check', 'aria-label': 'Forward check' },
    h('h3', {}, 'Forward check: travel times through the depth section'),
    h('p', { class: 'forward-check-overall' }, h('strong', {}, 'Overall RMS of observed minus computed times: '),
      summary.overall ?? 'no pick could be compared'),
    h('p', { class: 'plot-note' }, `${summary.model} ${summary.grid}`),
    h('div', { class: 'forward-check-tables' },
      resultTable(summary.perShot, 'forward-check-shots', true),
      resultTable(summary.worstReceivers, 'forward-check-receivers', true),
    ),
    summary.notes.length > 0 ? h('ul', { class: 'table-notes' }, ...summary.notes.map((note) => h('li', {}, note))) : null,
  );
}

/**
 * The crustal-profile results: the earth-curvature decision and the sphere-fitted layers, and the
 * shots and stations far off the profile line; null when the interpretation has neither.
 */
export function crustalProfileResults(result: Interpretation, printable: boolean): HTMLElement | null {
  const sentence = earthCurvatureSentence(result);
  const layers = sphericalLayerTable(result);
  const offLine = offLineTable(result);
  const terms = timeTermSentence(result);
  const stations = stationDepthTable(result);
  if (sentence === null && offLine.rows.length === 0 && terms === null) return null;
  const heading = result.units.scale === 'crustal' ? 'Crustal profile' : 'Time terms';
  return h('section', { class: 'crustal-results', 'aria-label': heading },
    h('h2', {}, heading),
    sentence === null ? null : h('p', { class: 'earth-curvature' }, sentence),
    layers.rows.length > 0 ? resultTable(layers, 'spherical-layer-table', printable) : null,
    offLine.rows.length > 0 ? resultTable(offLine, 'off-line-table', printable) : null,
    terms === null ? null : h('p', { class: 'time-term-summary' }, terms),
    // On engineering lines the delay-time sections give the depth under every receiver; the station
    // table of the time terms is for crustal profiles (the JSON has it either way).
    stations.rows.length > 0 && result.units.scale === 'crustal' ? resultTable(stations, 'station-depth-table', printable) : null,
  );
}

/**
 * The reversed-profile results: reversed pairs, dipping layers and the forward check, each left
 * out when the interpretation has none; null when it has none of them (a survey without reversed
 * shots, or a revision stored before these results existed). `printable`: every footnote shown.
 */
export function reversedProfileResults(result: Interpretation, printable: boolean): HTMLElement | null {
  const pairs = reversedPairTable(result);
  const dipping = dippingLayerTable(result);
  const check = forwardCheckBlock(result);
  if (pairs.rows.length === 0 && dipping.rows.length === 0 && check === null) return null;
  return h('section', { class: 'reversed-results', 'aria-label': 'Reversed profiles' },
    h('h2', {}, 'Reversed profiles'),
    pairs.rows.length > 0 ? resultTable(pairs, 'reversed-pair-table', printable) : null,
    dipping.rows.length > 0 ? resultTable(dipping, 'dipping-layer-table', printable) : null,
    check,
  );
}
