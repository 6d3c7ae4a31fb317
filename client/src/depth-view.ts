/**
 * The depth view: the depth section (see depth-figure.ts) with the choice of method, depth below
 * ground or elevation (when the table gave elevations), and PNG export.
 */
import type { Interpretation, StoredPick } from './api-types.js';
import { depthFigure, groundProfile, refractorMethods, shortMethodName, type DepthMode } from './depth-figure.js';
import { h, replaceChildren } from './dom.js';
import { loadPlotly } from './plotly-loader.js';

export class DepthView {
  readonly element: HTMLElement;
  private readonly plot: HTMLDivElement;
  private readonly toolbar: HTMLElement;
  private readonly note: HTMLElement;
  private result: Interpretation | null = null;
  private picks: readonly StoredPick[] | null = null;
  private uiRevision = '';
  private method: string | null = null;
  private mode: DepthMode = 'depth';

  constructor(private readonly fileStem: () => string) {
    this.plot = h('div', { class: 'plot depth-plot', id: 'depth-plot', role: 'figure', 'aria-label': 'Depth section: ground surface, refractor depths with their uncertainty, shots and layer velocities' });
    this.toolbar = h('div', { class: 'plot-toolbar', role: 'toolbar', 'aria-label': 'Depth section controls' });
    this.note = h('p', { class: 'plot-note' });
    this.element = h('section', { class: 'view depth-view', id: 'depth-view' }, this.toolbar, h('div', { class: 'plot-frame' }, this.plot), this.note);
  }

  show(result: Interpretation, picks: readonly StoredPick[] | null, uiRevision: string): Promise<void> {
    this.result = result;
    this.picks = picks;
    this.uiRevision = uiRevision;
    const methods = refractorMethods(result);
    if (this.method === null || !methods.includes(this.method)) this.method = methods[0] ?? null;
    if (this.mode === 'elevation' && groundProfile(result, picks) === null) this.mode = 'depth';
    this.renderToolbar(methods);
    return this.draw();
  }

  private renderToolbar(methods: readonly string[]): void {
    const hasElevations = this.result !== null && groundProfile(this.result, this.picks) !== null;
    const methodGroup = h('fieldset', { class: 'segmented-field' }, h('legend', {}, 'Method'),
      ...methods.map((method) => h('label', { class: 'check', title: method },
        h('input', { type: 'radio', name: 'depth-method', value: method, checked: method === this.method, onchange: () => {
          this.method = method;
          this.renderNote();
          void this.draw();
        } }),
        ` ${shortMethodName(method)}`)),
    );
    const modeGroup = h('fieldset', { class: 'segmented-field' }, h('legend', {}, 'Show'),
      h('label', { class: 'check' }, h('input', { type: 'radio', name: 'depth-mode', value: 'depth', checked: this.mode === 'depth', onchange: () => this.setMode('depth') }), ' depth below ground'),
      h('label', { class: 'check', title: hasElevations ? '' : 'the pick table has no elevations' },
        h('input', { type: 'radio', name: 'depth-mode', value: 'elevation', checked: this.mode === 'elevation', disabled: !hasElevations, onchange: () => this.setMode('elevation') }),
        ' elevation'),
    );
    const png = h('button', { type: 'button', id: 'depth-png', onclick: () => void this.savePng() }, 'Save PNG');
    replaceChildren(this.toolbar, methodGroup, modeGroup, h('span', { class: 'toolbar-spacer' }), png);
    this.renderNote();
  }

  private renderNote(): void {
    const refractor = this.result?.refractors.find((entry) => entry.method === this.method);
    replaceChildren(this.note,
      refractor ? `Markers: ${refractor.method}, ±1 standard error; a shot side without the branches that method needs (an off-end shot has no direct wave, so no crossover distance) has no marker. ` : 'No refractor depths could be computed for this interpretation. ',
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
