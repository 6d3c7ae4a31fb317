/**
 * The printable report of one revision: survey, revision, software version, source and options;
 * the travel-time plot and the depth section as images (the section under every receiver, with
 * its seams, when the survey has reversed pairs); the layer and shot tables; the reversed pairs,
 * dipping layers and forward check; every warning; the cautions; the references. Laid out for A4 or Letter paper: "Print / save as PDF" gives a
 * clean PDF from the browser's own print dialog.
 */
import { api } from './api.js';
import type { Interpretation, Revision, Survey } from './api-types.js';
import { depthFigure, sectionMethod } from './depth-figure.js';
import { h, replaceChildren } from './dom.js';
import { shortDateTime } from './format.js';
import { loadPlotly } from './plotly-loader.js';
import { cautionList, crustalProfileResults, layerTable, referenceList, resultTable, reversedProfileResults, shotTable, surveyWarnings } from './results-view.js';
import { CRUSTAL_REDUCTION_VELOCITY } from './travel-time-view.js';
import { seamTable } from './reversed-results.js';
import { paths } from './routes.js';
import { travelTimeFigure } from './travel-time-figure.js';
import type { Figure } from './travel-time-figure.js';

/** Plot images are drawn at this size (px) and scaled to the page width. */
const IMAGE_WIDTH = 1100;

async function figureImage(figure: Figure, height: number, alt: string): Promise<HTMLImageElement> {
  const Plotly = await loadPlotly();
  const holder = h('div', { class: 'offscreen' });
  document.body.append(holder);
  try {
    const layout = { ...figure.layout, width: IMAGE_WIDTH, height, dragmode: false };
    await Plotly.newPlot(holder, figure.data, layout, { staticPlot: true });
    const url = await Plotly.toImage(holder, { format: 'png', width: IMAGE_WIDTH, height, scale: 2 });
    return h('img', { src: url, alt, class: 'report-figure', width: IMAGE_WIDTH, height });
  } finally {
    Plotly.purge(holder);
    holder.remove();
  }
}

function factsTable(survey: Survey, revision: Revision, latest: number): HTMLTableElement {
  const result: Interpretation = revision.result;
  const row = (name: string, value: string) => h('tr', {}, h('th', { scope: 'row' }, name), h('td', {}, value));
  return h('table', { class: 'facts' },
    h('tbody', {},
      row('Survey', survey.name),
      survey.description ? row('Description', survey.description) : null,
      row('Revision', `${revision.number} of ${latest}${revision.number < latest ? ' (a newer revision exists)' : ''}, made ${shortDateTime(revision.createdAt)}`),
      row('Pick table', result.source ?? '—'),
      row('Data', `${result.summary.pickCount} picks, ${result.summary.shotCount} shots, ${result.summary.shotSideCount} shot sides, ${result.summary.excludedPickCount} excluded`),
      row('Method', `branches by ${result.options.fitMethod} line fits; depths by the intercept-time and crossover-distance methods (plane layers under each shot side), combined over the survey${(result.reversedPairs?.length ?? 0) > 0 ? `; under every receiver by the plus-minus and generalized reciprocal methods from ${result.reversedPairs!.length} reversed pairs, with plane dipping layers under each pair` : ''}${result.forwardCheck ? '; the section checked by travel times computed through it on a grid' : ''}${result.options.bootstrapReplicates > 0 ? `; bootstrap of ${result.options.bootstrapReplicates} replicates` : ''}`),
      row('Units', `${result.units.distance}, ${result.units.time}, ${result.units.velocity}`),
      row('Software', `${result.software.name} ${result.software.version}`),
      row('Address', location.origin + paths.revision(survey.id, revision.number)),
    ),
  );
}

export async function renderReport(root: HTMLElement, surveyId: string, revisionNumber: number): Promise<void> {
  document.body.classList.add('report-body');
  replaceChildren(root, h('p', { class: 'status' }, 'Preparing the report…'));
  try {
    const [survey, revision, revisions, picks] = await Promise.all([
      api.getSurvey(surveyId), api.getRevision(surveyId, revisionNumber), api.listRevisions(surveyId), api.currentPicks(surveyId).catch(() => null),
    ]);
    const result = revision.result;
    const latest = revisions[revisions.length - 1]?.number ?? revision.number;
    // Excluded picks are drawn only when the stored picks are the ones this revision was made from.
    const storedPicks = picks !== null && picks.version === revision.surveyVersion ? picks.pickSet.picks : null;
    const travel = travelTimeFigure(result, storedPicks, new Set(), { hiddenShots: new Set(), reductionVelocity: result.units.scale === 'crustal' ? CRUSTAL_REDUCTION_VELOCITY : null, showLabels: result.shots.length <= 5, dragMode: 'zoom', uiRevision: 'report', allowWebgl: false });
    const method = sectionMethod(result);
    const depth = depthFigure(result, storedPicks, method, 'depth', 'report');
    const seams = seamTable(result, method);
    const seamCount = seams.rows.length;
    const reversed = reversedProfileResults(result, true);
    const [travelImage, depthImage] = [
      await figureImage(travel, 640, 'Travel-time plot'),
      await figureImage(depth, 460, 'Depth section'),
    ];
    document.title = `${survey.name}, revision ${revision.number}: slopebreak report`;
    replaceChildren(root, h('article', { class: 'report', id: 'report' },
      h('div', { class: 'report-actions no-print' },
        h('button', { type: 'button', id: 'print-report', onclick: () => window.print() }, 'Print / save as PDF'),
        h('a', { class: 'button-link', href: paths.revision(survey.id, revision.number) }, 'Back to the survey'),
      ),
      h('header', { class: 'report-head' },
        h('p', { class: 'report-kicker' }, 'slopebreak · seismic refraction interpretation report'),
        h('h1', {}, survey.name),
        factsTable(survey, revision, latest),
      ),
      cautionList(result.cautions, 'report-cautions'),
      h('section', { class: 'report-section' }, layerTable(result)),
      crustalProfileResults(result, true),
      h('section', { class: 'report-section' }, h('h2', {}, 'Travel times'), travelImage,
        h('p', { class: 'plot-note' }, `${result.units.scale === 'crustal' ? `Reduced time t \u2212 x/${CRUSTAL_REDUCTION_VELOCITY}\u202fkm/s. ` : ''}Picks by branch (colour and marker shape), fitted branch lines, fitted crossovers (ringed), residuals against the branch lines underneath.`)),
      h('section', { class: 'report-section' }, h('h2', {}, 'Depth section'), depthImage,
        h('p', { class: 'plot-note' }, `${method ?? 'No refractor depths'}; ±1 standard error.${seamCount > 0 ? ` Dotted vertical marks: the ${seamCount} seam${seamCount === 1 ? '' : 's'} where the section passes from one reversed pair to the next (listed below).` : ''} Dashed: the survey's combined layer tops.`),
        seamCount > 0 ? resultTable(seams, 'seam-table', true) : null),
      h('section', { class: 'report-section' }, shotTable(result)),
      reversed ? h('section', { class: 'report-section' }, reversed) : null,
      h('section', { class: 'report-section' }, h('h2', {}, 'Warnings'),
        h('p', { class: 'plot-note' }, `${result.warnings.length} in all. Warnings about a layer are printed under it in the layer table, those about a shot under it in the shot table; the rest concern the whole survey:`),
        surveyWarnings(result)),
      referenceList(result),
      h('footer', { class: 'report-foot' }, `${result.software.name} ${result.software.version} · survey ${survey.name} · revision ${revision.number} · printed ${shortDateTime(new Date().toISOString())}`),
    ));
    root.dataset['ready'] = 'true';
  } catch (error) {
    replaceChildren(root, h('p', { class: 'status important', role: 'alert' }, `The report could not be prepared: ${error instanceof Error ? error.message : String(error)}. `,
      h('a', { href: '/' }, 'Back to the surveys')));
  }
}
