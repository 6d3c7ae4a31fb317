/**
 * The depth view: the depth section (see depth-figure.ts) with the choice of method, depth below
 * ground or refractor elevation (when the table gave elevations and every point of the method has
 * one), and PNG export; under it, the reversed-profile results the section rests on (reversed
 * pairs, dipping layers, the forward check of the section).
 */
import type { Interpretation, StoredPick } from './api-types.js';
import { depthFigure, elevationModeAvailable, groundProfile, isAlongLine, methodLabel, refractorMethods, type DepthMode } from './depth-figure.js';
import { h, replaceChildren } from './dom.js';
import { quantity } from './format.js';
import { loadPlotly } from './plotly-loader.js';
import { reversedProfileResults } from './results-view.js';

export class DepthView {
  readonly element: HTMLElement;
  private readonly plot: HTMLDivElement;
  private readonly toolbar: HTMLElement;
  private readonly note: HTMLElement;
  private readonly reversed: HTMLElement;
  private result: Interpretation | null = null;
  private picks: readonly StoredPick[] | null = null;
  private uiRevision = '';
  private method: string | null = null;
  private mode: DepthMode = 'depth';

  constructor(private readonly fileStem: () => string) {
    this.plot = h('div', { class: 'plot depth-plot', id: 'depth-plot', role: 'figure', 'aria-label': 'Depth section: ground surface, refractor depths with their uncertainty, shots and layer velocities' });
    this.toolbar = h('div', { class: 'plot-toolbar', role: 'toolbar', 'aria-label': 'Depth section controls' });
    this.note = h('p', { class: 'plot-note' });
    this.reversed = h('div', { class: 'depth-results', id: 'depth-results' });
    this.element = h('section', { class: 'view depth-view', id: 'depth-view' }, this.toolbar, h('div', { class: 'plot-frame' }, this.plot), this.note, this.reversed);
  }

  show(result: Interpretation, picks: readonly StoredPick[] | null, uiRevision: string): Promise<void> {
    this.result = result;
    this.picks = picks;
    this.uiRevision = uiRevision;
    const methods = refractorMethods(result);
    if (this.method === null || !methods.includes(this.method)) this.method = methods[0] ?? null;
    this.keepModeAvailable();
    this.renderToolbar(methods);
    replaceChildren(this.reversed, reversedProfileResults(result, false));
    return this.draw();
  }

  /** Back to depth when the elevation mode cannot show the chosen method. */
  private keepModeAvailable(): void {
    if (this.mode === 'elevation' && (this.result === null || !elevationModeAvailable(this.result, this.picks, this.method))) this.mode = 'depth';
  }

  private renderToolbar(methods: readonly string[]): void {
    const methodGroup = h('fieldset', { class: 'segmented-field' }, h('legend', {}, 'Method'),
      ...methods.map((method) => h('label', { class: 'check', title: method },
        h('input', { type: 'radio', name: 'depth-method', value: method, checked: method === this.method, onchange: () => {
          this.method = method;
          this.keepModeAvailable();
          // The elevation choice depends on the method: updated in place, so the keyboard focus stays in the group.
          this.updateModeControls();
          this.renderNote();
          void this.draw();
        } }),
        ` ${methodLabel(method)}`)),
    );
    const modeGroup = h('fieldset', { class: 'segmented-field' }, h('legend', {}, 'Show'),
      h('label', { class: 'check', title: 'depth of each refractor below the ground' },
        h('input', { type: 'radio', name: 'depth-mode', value: 'depth', checked: this.mode === 'depth', onchange: () => this.setMode('depth') }), ' depth'),
      h('label', { class: 'check' },
        h('input', { type: 'radio', name: 'depth-mode', value: 'elevation', checked: this.mode === 'elevation', onchange: () => this.setMode('elevation') }),
        ' elevation'),
    );
    const png = h('button', { type: 'button', id: 'depth-png', onclick: () => void this.savePng() }, 'Save PNG');
    replaceChildren(this.toolbar, methodGroup, modeGroup, h('span', { class: 'toolbar-spacer' }), png);
    this.updateModeControls();
    this.renderNote();
  }

  /** The mode radios as the chosen method allows: elevation only when every point of it has one (the tooltip says why not). */
  private updateModeControls(): void {
    const result = this.result;
    const possible = result !== null && elevationModeAvailable(result, this.picks, this.method);
    const reason = result === null || groundProfile(result, this.picks) === null
      ? 'the pick table has no elevations'
      : possible ? 'refractor elevation: ground (or datum) elevation minus depth' : 'some positions of this method have no elevation';
    const elevation = this.toolbar.querySelector<HTMLInputElement>('input[name="depth-mode"][value="elevation"]');
    const depth = this.toolbar.querySelector<HTMLInputElement>('input[name="depth-mode"][value="depth"]');
    if (elevation) {
      elevation.disabled = !possible;
      elevation.checked = this.mode === 'elevation';
      elevation.closest('label')?.setAttribute('title', reason);
    }
    if (depth) depth.checked = this.mode === 'depth';
  }

  private renderNote(): void {
    const refractors = this.result?.refractors.filter((entry) => entry.method === this.method) ?? [];
    const refractor = refractors[0];
    const units = this.result?.units;
    const alongLine = refractor !== undefined && isAlongLine(refractor);
    const seamCount = refractors.reduce((sum, entry) => sum + (entry.seams?.length ?? 0), 0);
    const velocities = refractors
      .filter((entry) => entry.velocity !== undefined && entry.velocity !== null)
      .map((entry) => `top of layer ${entry.interface + 1} ${quantity(entry.velocity, entry.velocitySE, units?.velocity ?? '')}`);
    replaceChildren(this.note,
      !refractor ? 'No refractor depths could be computed for this interpretation. '
        : alongLine
          ? `Line and band: ${refractor.method}, ±1 standard error, under every receiver between a pair of shots shot from both ends; each point names its pair.${velocities.length > 0 ? ` Refractor velocity: ${velocities.join('; ')}.` : ''} ` +
            (seamCount > 0 ? `Dotted vertical marks: the ${seamCount} seam${seamCount === 1 ? '' : 's'} where the section passes from one reversed pair to the next (hover for the two pairs and the depth step). ` : '')
          : `Markers: ${refractor.method}, ±1 standard error; a shot side without the branches that method needs (an off-end shot has no direct wave, so no crossover distance) has no marker. `,
      'Dashed lines and light bands: the survey\u2019s combined layer tops, ±1 standard error. Depths are an interpretation: confirm them with boreholes before they are used.');
  }

  private setMode(mode: DepthMode): void {
    this.mode = mode;
    void this.draw();
  }

  private async draw(): Promise<void> {
    if (!this.result) return;
    const Plotly = await loadPlotly();
    const figure = depthFigure(this.result, this.picks, this.method, this.mode, this.uiRevision);
    await Plotly.react(this.plot, figure.data, figure.layout, {
      responsive: true, displaylogo: false, modeBarButtonsToRemove: ['toImage', 'sendDataToCloud'],
      showSendToCloud: false, showEditInChartStudio: false, showLink: false,
    });
    this.plot.dataset['drawn'] = `${this.method ?? ''}:${this.mode}:${Date.now()}`;
  }

  private async savePng(): Promise<void> {
    const Plotly = await loadPlotly();
    await Plotly.downloadImage(this.plot, { format: 'png', filename: `${this.fileStem()}-depth-section`, width: 1400, height: 700, scale: 1 });
  }
}
