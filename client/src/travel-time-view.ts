/**
 * The travel-time view: the plot (see travel-time-figure.ts) with its controls — what dragging
 * does (zoom, pan, box or lasso selection), reduced time, labels, PNG export — the shots to show,
 * and the branch-editing panel: assign the selected picks to a branch, exclude them, hand them
 * back to the automatic split, select picks by shot and offset range from the keyboard, move a
 * breakpoint, undo the last edit. Every edit goes through `hooks.applyEdits`, which stores it and
 * re-interprets as a new revision.
 *
 * Keys (when focus is not in a text field): 1–9 assign the selection to that branch, X excludes,
 * A hands back to automatic, Esc clears the selection, Ctrl+Z (⌘Z) undoes.
 */
import type { BranchEdit, Interpretation, StoredPick } from './api-types.js';
import { assignmentEdits, breakpointEdits, breakpointsOf, placesByLine, type Assignment, type Breakpoint } from './branch-editing.js';
import { h, keepingFocus, replaceChildren } from './dom.js';
import { branchLabel, plain, withError } from './format.js';
import { loadPlotly, webglAvailable } from './plotly-loader.js';
import { branchChip, layerChip } from './results-view.js';
import { travelTimeFigure, type TravelTimeOptions } from './travel-time-figure.js';

/** Reduction velocity a crustal survey opens with, km/s (8 km/s flattens Pn; 6 km/s flattens Pg: common practice). */
export const CRUSTAL_REDUCTION_VELOCITY = 8;

export interface EditState {
  /** Edits can be made (the latest revision of the current picks is shown). */
  readonly editable: boolean;
  /** Why not, when not, with a link to where they can. */
  readonly reason?: string;
  readonly latestPath?: string;
  /** Interpret the current picks again (offered when the latest revision is older than the picks). */
  readonly reinterpret?: () => Promise<void>;
}

export interface TravelTimeHooks {
  readonly applyEdits: (edits: BranchEdit[], description: string) => Promise<unknown>;
  readonly undo: () => Promise<void>;
  /** What undo would take back, or null when there is nothing to undo. */
  readonly undoLabel: () => string | null;
  readonly fileStem: () => string;
}

type DragMode = TravelTimeOptions['dragMode'];

/** Velocity labels are shown by default while at most this many shots are drawn. */
const AUTO_LABEL_SHOTS = 5;

const DRAG_MODES: readonly { mode: DragMode; label: string; hint: string }[] = [
  { mode: 'zoom', label: 'Zoom', hint: 'drag a rectangle to zoom; double-click to see every pick' },
  { mode: 'pan', label: 'Pan', hint: 'drag to move along the line' },
  { mode: 'select', label: 'Box select', hint: 'drag a rectangle around picks to select them (Shift adds)' },
  { mode: 'lasso', label: 'Lasso select', hint: 'draw around picks to select them (Shift adds)' },
];

export class TravelTimeView {
  readonly element: HTMLElement;
  private readonly plot: HTMLDivElement;
  private readonly shotsPanel: HTMLElement;
  private readonly editPanel: HTMLElement;
  private readonly toolbar: HTMLElement;
  private result: Interpretation | null = null;
  private picks: readonly StoredPick[] | null = null;
  private editState: EditState = { editable: false };
  private uiRevision = '';
  private readonly hiddenShots = new Set<string>();
  private selection = new Set<number>();
  private dragMode: DragMode = 'zoom';
  private reductionVelocity: number | null = null;
  /** The user's choice for velocity labels; null: on while at most `AUTO_LABEL_SHOTS` shots are shown. */
  private labelChoice: boolean | null = null;
  private busy = false;
  private listening = false;
  private drawing: Promise<void> = Promise.resolve();
  private readonly webgl = webglAvailable();
  private shiftHeld = false;
  private readonly selectionLive = h('p', { class: 'selection-count', id: 'selection-count', 'aria-live': 'polite' });
  /** Draws so far: each draw puts a dragged breakpoint line back where the data place it. */
  private drawCount = 0;
  /** The breakpoint chosen in the panel (index into breakpointsOf), drawn on the plot to drag. */
  private chosenBreakpoint = 0;

  constructor(private readonly hooks: TravelTimeHooks) {
    this.plot = h('div', { class: 'plot travel-time-plot', id: 'travel-time-plot', role: 'figure', 'aria-label': 'Travel-time plot: picks, fitted branch lines, crossovers and residuals' });
    this.toolbar = h('div', { class: 'plot-toolbar', role: 'toolbar', 'aria-label': 'Travel-time plot controls' });
    this.shotsPanel = h('section', { class: 'side-panel shots-panel', 'aria-label': 'Shots shown' });
    this.editPanel = h('section', { class: 'side-panel edit-panel', id: 'edit-panel', 'aria-label': 'Branch editing' });
    this.element = h('section', { class: 'view travel-time-view', id: 'travel-time-view' },
      this.toolbar,
      h('div', { class: 'view-body' }, h('div', { class: 'plot-frame' }, this.plot), h('div', { class: 'side-column' }, this.editPanel, this.shotsPanel)),
    );
    document.addEventListener('keydown', (event) => this.onKey(event));
    // Shift held while a box or lasso selection ends adds to the selection instead of replacing it.
    const trackShift = (event: KeyboardEvent | PointerEvent) => {
      this.shiftHeld = event.shiftKey;
    };
    document.addEventListener('keydown', trackShift);
    document.addEventListener('keyup', trackShift);
    document.addEventListener('pointerdown', trackShift, true);
  }

  /** Show an interpretation; `picks` are the stored picks (for excluded picks and editing). */
  show(result: Interpretation, picks: readonly StoredPick[] | null, editState: EditState, uiRevision: string): Promise<void> {
    const surveyChanged = uiRevision !== this.uiRevision;
    this.result = result;
    this.picks = picks;
    this.editState = editState;
    this.uiRevision = uiRevision;
    if (surveyChanged) {
      this.hiddenShots.clear();
      // Long profiles are read in reduced time (common practice: 8 km/s puts Pn flat); short ones in plain time.
      this.reductionVelocity = result.units.scale === 'crustal' ? CRUSTAL_REDUCTION_VELOCITY : null;
      this.labelChoice = null;
      this.selection = new Set();
      this.chosenBreakpoint = 0;
    }
    const lines = new Set(picks?.map((pick) => pick.line) ?? []);
    this.selection = new Set([...this.selection].filter((line) => lines.has(line)));
    this.renderToolbar();
    this.renderShots();
    this.renderEditPanel();
    return this.draw();
  }

  get visible(): boolean {
    return this.element.isConnected && !this.element.hidden;
  }

  private renderToolbar(): void {
    keepingFocus(this.element, () => this.renderToolbarNow());
  }

  private renderToolbarNow(): void {
    if (!this.result) return;
    const { units } = this.result;
    const modes = h('div', { class: 'segmented', role: 'group', 'aria-label': 'Dragging on the plot' },
      ...DRAG_MODES.map(({ mode, label, hint }) => h('button', {
        type: 'button', 'aria-pressed': String(mode === this.dragMode), title: hint, 'data-drag-mode': mode,
        onclick: () => {
          this.dragMode = mode;
          this.renderToolbar();
          void this.draw();
        },
      }, label)),
    );
    const typical = units.velocity === 'km/s' ? CRUSTAL_REDUCTION_VELOCITY : 3000;
    const velocityInput = h('input', {
      type: 'number', id: 'reduction-velocity', min: units.velocity === 'km/s' ? 0.1 : 50, step: 'any', value: String(this.reductionVelocity ?? typical),
      disabled: this.reductionVelocity === null, 'aria-label': `Reduction velocity (${units.velocity})`, class: 'narrow',
      onchange: () => {
        const value = Number(velocityInput.value);
        if (Number.isFinite(value) && value > 0) {
          this.reductionVelocity = value;
          void this.draw();
        }
      },
    });
    const reduced = h('label', { class: 'check' },
      h('input', {
        type: 'checkbox', id: 'reduced-time', checked: this.reductionVelocity !== null,
        onchange: (event: Event) => {
          const on = (event.target as HTMLInputElement).checked;
          const typed = Number(velocityInput.value);
          this.reductionVelocity = on ? (Number.isFinite(typed) && typed > 0 ? typed : typical) : null;
          velocityInput.disabled = !on;
          void this.draw();
        },
      }),
      ' Reduced time at ', velocityInput, ` ${units.velocity}`,
    );
    const labels = h('label', { class: 'check' },
      h('input', { type: 'checkbox', id: 'branch-labels', title: 'Write each branch\u2019s apparent velocity and intercept time beside it', checked: this.showLabels(), onchange: (event: Event) => {
        this.labelChoice = (event.target as HTMLInputElement).checked;
        void this.draw();
      } }),
      ' Label v, tᵢ',
    );
    const png = h('button', { type: 'button', id: 'travel-time-png', onclick: () => void this.savePng() }, 'Save PNG');
    const reset = h('button', { type: 'button', onclick: () => void this.resetZoom(), title: 'Zoom out to every pick' }, 'Show all picks');
    replaceChildren(this.toolbar, modes, reduced, labels, h('span', { class: 'toolbar-spacer' }), reset, png);
  }

  private renderShots(): void {
    keepingFocus(this.element, () => this.renderShotsNow());
  }

  private renderShotsNow(): void {
    if (!this.result) return;
    const result = this.result;
    const rows = result.shots.map((shot) => {
      const warnings = result.warnings.filter((warning) => warning.shot === shot.id && warning.level !== 'info').length;
      const box = h('input', {
        type: 'checkbox', checked: !this.hiddenShots.has(shot.id), 'data-shot-toggle': shot.id,
        onchange: (event: Event) => {
          if ((event.target as HTMLInputElement).checked) this.hiddenShots.delete(shot.id);
          else this.hiddenShots.add(shot.id);
          this.dropHiddenFromSelection();
          this.renderToolbar();
          void this.draw();
        },
      });
      return h('li', {}, h('label', { class: 'check' }, box, ` ${shot.id}`,
        h('span', { class: 'quiet' }, ` at ${plain(shot.sourceX)} ${result.units.distance}`),
        warnings > 0 ? h('span', { class: 'badge', title: `${warnings} warning(s) about this shot, listed in the shot table` }, `${warnings} ⚠`) : null,
      ));
    });
    const all = (show: boolean) => () => {
      this.hiddenShots.clear();
      if (!show) for (const shot of result.shots) this.hiddenShots.add(shot.id);
      this.dropHiddenFromSelection();
      this.renderShots();
      this.renderToolbar();
      void this.draw();
    };
    replaceChildren(this.shotsPanel,
      h('h3', {}, 'Shots shown'),
      h('div', { class: 'button-row' }, h('button', { type: 'button', onclick: all(true) }, 'All'), h('button', { type: 'button', onclick: all(false) }, 'None')),
      h('ul', { class: 'shot-toggles' }, ...rows),
    );
  }

  private branchNumbers(): number[] {
    const highest = Math.max(1, ...(this.result?.shots.flatMap((shot) => shot.sides.flatMap((side) => side.branches.map((branch) => branch.index))) ?? [1]));
    return Array.from({ length: Math.min(9, highest + 1) }, (_, k) => k + 1);
  }

  private renderEditPanel(): void {
    keepingFocus(this.element, () => this.renderEditPanelNow());
  }

  private renderEditPanelNow(): void {
    const result = this.result;
    if (!result) return;
    if (!this.editState.editable) {
      const reinterpret = this.editState.reinterpret;
      replaceChildren(this.editPanel, this.layerSummary(result), h('h3', {}, 'Branch editing'),
        h('p', { class: 'quiet' }, this.editState.reason ?? 'Editing is not available.'),
        this.editState.latestPath ? h('a', { href: this.editState.latestPath, 'data-nav': 'true' }, 'Open the latest revision') : null,
        reinterpret ? h('button', { type: 'button', id: 'reinterpret', onclick: () => void reinterpret() }, 'Interpret the current picks') : null);
      return;
    }
    const count = this.selection.size;
    const disabled = count === 0 || this.busy;
    const assignButton = (assign: Assignment, label: Node | string, title: string) =>
      h('button', { type: 'button', disabled, title, 'data-assign': String(assign), onclick: () => void this.assignSelection(assign) }, label);
    const layers = this.result?.layers ?? [];
    const branchButtons = this.branchNumbers().map((index) => assignButton(index, h('span', {}, branchChip(index, branchLabel(index, layers)), ` ${branchLabel(index, layers)}`), `Put the selected picks on branch ${index}, the ${branchLabel(index, layers)} (key ${index})`));
    const undoLabel = this.hooks.undoLabel();
    const undo = h('button', { type: 'button', id: 'undo-edit', disabled: undoLabel === null || this.busy, title: undoLabel ? `Undo: ${undoLabel} (Ctrl+Z)` : 'Nothing to undo', onclick: () => void this.runUndo() },
      undoLabel ? `Undo ${undoLabel}` : 'Undo');

    replaceChildren(this.editPanel,
      this.layerSummary(result),
      h('h3', {}, 'Branch editing'),
      this.selectionCount(count),
      h('div', { class: 'assign-grid', role: 'group', 'aria-label': 'Put the selected picks on branch' }, ...branchButtons),
      h('div', { class: 'button-row' },
        assignButton('exclude', 'Exclude', 'Leave the selected picks out of every fit (key X)'),
        assignButton('automatic', 'Unassign', 'Remove your branch from the selected picks: each joins the branch whose line fits it best (the automatic split, if no pick of its side keeps a branch of yours) (key A)'),
      ),
      h('div', { class: 'button-row' }, undo),
      this.rangeForm(result),
      this.breakpointForm(result),
    );
  }

  /**
   * The selection count, one element kept for the life of the view (its text changes): a screen
   * reader announces a live region whose text changes, not one that is replaced.
   */
  private selectionCount(count: number): HTMLElement {
    replaceChildren(this.selectionLive,
      count === 0 ? 'No picks selected. Click picks, or use Box or Lasso select.' : `${count} pick${count === 1 ? '' : 's'} selected`,
      count > 0 ? h('button', { type: 'button', class: 'link-button', onclick: () => this.setSelection(new Set()) }, 'clear') : null);
    return this.selectionLive;
  }

  /** The layers in brief, beside the plot, so that the result is on screen with it (the full table is below). */
  private layerSummary(result: Interpretation): HTMLElement {
    const { units } = result;
    return h('table', { class: 'layer-summary', id: 'layer-summary', 'aria-label': 'Layers in brief' },
      h('caption', {}, 'Layers'),
      h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'Layer'), h('th', { scope: 'col' }, units.velocity), h('th', { scope: 'col' }, `top (${units.distance})`))),
      h('tbody', {}, ...result.layers.map((layer) => h('tr', {},
        h('th', { scope: 'row' }, ...layerChip(layer, units.scale)),
        h('td', { class: 'number' }, withError(layer.velocity, layer.velocitySE)),
        h('td', { class: 'number' }, layer.index === 1 ? '0' : withError(layer.depthToTop, layer.depthToTopSE)),
      ))),
    );
  }

  /** Select picks by shot, side and offset range: the keyboard way to a selection. */
  private rangeForm(result: Interpretation): HTMLElement {
    const shot = h('select', { 'aria-label': 'Shot', id: 'range-shot' }, ...result.shots.map((entry) => h('option', { value: entry.id }, entry.id)));
    const side = h('select', { 'aria-label': 'Side', id: 'range-side' }, h('option', { value: 'forward' }, 'forward'), h('option', { value: 'reverse' }, 'reverse'));
    const from = h('input', { type: 'number', step: 'any', class: 'narrow', 'aria-label': `From offset (${result.units.distance})`, id: 'range-from', value: '0' });
    const to = h('input', { type: 'number', step: 'any', class: 'narrow', 'aria-label': `To offset (${result.units.distance})`, id: 'range-to', value: '' });
    const form = h('form', { class: 'range-form' },
      h('h4', {}, 'Select by offset from the shot'),
      h('div', { class: 'form-row' }, shot, side),
      h('div', { class: 'form-row' }, 'from ', from, ' to ', h('span', { class: 'nowrap' }, to, ` ${result.units.distance}`)),
      h('button', { type: 'submit', disabled: this.busy }, 'Select'),
    );
    form.addEventListener('submit', (event) => {
      event.preventDefault();
      const low = from.value === '' ? -Infinity : Number(from.value);
      const high = to.value === '' ? Infinity : Number(to.value);
      const lines = new Set<number>();
      const places = placesByLine(result);
      for (const [line, place] of places) {
        if (place.shot === shot.value && place.side === side.value && place.offset >= low && place.offset <= high) lines.add(line);
      }
      this.setSelection(lines);
      if (lines.size === 0) {
        const offsets = [...places.values()].filter((place) => place.shot === shot.value && place.side === side.value).map((place) => place.offset);
        const count = this.editPanel.querySelector('#selection-count');
        if (count) {
          count.textContent = offsets.length === 0
            ? `Shot ${shot.value} has no ${side.value} side.`
            : `No picks of shot ${shot.value}, ${side.value}, between those offsets: its offsets run from ${plain(Math.min(...offsets))} to ${plain(Math.max(...offsets))} ${result.units.distance} (distance from the shot, not position along the line).`;
        }
      }
    });
    return form;
  }

  private breakpointForm(result: Interpretation): HTMLElement {
    const breakpoints = breakpointsOf(result);
    if (breakpoints.length === 0) return h('p', { class: 'quiet' }, 'No breakpoints: no side has two branches.');
    if (this.chosenBreakpoint >= breakpoints.length) this.chosenBreakpoint = 0;
    const unit = result.units.distance;
    const label = (point: Breakpoint) => `${point.shot} ${point.side}: branch ${point.lowerBranch} → ${point.upperBranch}, between offsets ${plain(point.lastLowerOffset)} and ${plain(point.firstUpperOffset)} ${unit}`;
    // The picker shows the start; the whole text is in the list and in its tooltip.
    const choice = h('select', { id: 'breakpoint-choice', 'aria-label': 'Breakpoint', title: breakpoints[this.chosenBreakpoint] ? label(breakpoints[this.chosenBreakpoint]!) : '' },
      ...breakpoints.map((point, k) => h('option', { value: String(k), selected: k === this.chosenBreakpoint }, label(point))));
    const offset = h('input', { type: 'number', step: 'any', class: 'narrow', id: 'breakpoint-offset', 'aria-label': `New breakpoint offset (${unit})` });
    const suggest = () => {
      const point = breakpoints[this.chosenBreakpoint];
      if (point) offset.value = String(Number(((point.lastLowerOffset + point.firstUpperOffset) / 2).toPrecision(6)));
    };
    choice.addEventListener('change', () => {
      this.chosenBreakpoint = Number(choice.value);
      suggest();
      void this.draw();
    });
    suggest();
    const form = h('form', { class: 'breakpoint-form' },
      h('h4', {}, 'Move a breakpoint'),
      choice,
      h('div', { class: 'form-row' }, 'to offset ', offset, ` ${unit} from the shot`),
      h('button', { type: 'submit', disabled: this.busy, id: 'breakpoint-move' }, 'Move'),
      h('p', { class: 'quiet small' }, 'Or drag the dotted line on the plot.'),
    );
    form.addEventListener('submit', (event) => {
      event.preventDefault();
      void this.moveBreakpoint(Number(offset.value));
    });
    return form;
  }

  /** The chosen breakpoint, where it is drawn (between its last lower and first upper pick). */
  private breakpointMarker(): { x: number; label: string } | null {
    if (!this.result || !this.editState.editable) return null;
    const point = breakpointsOf(this.result)[this.chosenBreakpoint];
    const shot = this.result.shots.find((candidate) => candidate.id === point?.shot);
    if (!point || !shot || this.hiddenShots.has(shot.id)) return null;
    const direction = point.side === 'forward' ? 1 : -1;
    return { x: shot.sourceX + direction * ((point.lastLowerOffset + point.firstUpperOffset) / 2), label: `${point.shot} ${point.lowerBranch}→${point.upperBranch}` };
  }

  private async moveBreakpoint(offset: number): Promise<void> {
    const result = this.result;
    const point = result ? breakpointsOf(result)[this.chosenBreakpoint] : undefined;
    if (!result || !point || !this.picks || !Number.isFinite(offset)) return;
    const edits = breakpointEdits(result, this.picks, point, offset);
    await this.edit(edits, `move of breakpoint ${point.lowerBranch}→${point.upperBranch} of ${point.shot} ${point.side} to ${plain(offset)} ${result.units.distance}`);
  }

  /** Picks of hidden shots leave the selection: an edit never touches what is not shown. */
  private dropHiddenFromSelection(): void {
    const shotOf = new Map(this.picks?.map((pick) => [pick.line, pick.shot]) ?? []);
    const kept = new Set([...this.selection].filter((line) => !this.hiddenShots.has(shotOf.get(line) ?? '')));
    if (kept.size !== this.selection.size) {
      this.selection = kept;
      this.renderEditPanel();
    }
  }

  private setSelection(lines: Set<number>): void {
    this.selection = lines;
    this.renderEditPanel();
    void this.draw();
  }

  private async assignSelection(assign: Assignment): Promise<void> {
    if (!this.result || !this.picks || this.selection.size === 0) return;
    const edits = assignmentEdits(this.result, this.picks, this.selection, assign);
    const what = assign === 'exclude' ? 'exclusion' : assign === 'automatic' ? 'return to automatic' : `move to branch ${assign}`;
    await this.edit(edits, `${what} of ${this.selection.size} pick${this.selection.size === 1 ? '' : 's'}`);
  }

  private async edit(edits: BranchEdit[], description: string): Promise<void> {
    if (this.busy) return;
    this.busy = true;
    this.renderEditPanel();
    try {
      await this.hooks.applyEdits(edits, description);
      this.selection = new Set();
      void this.draw();
    } finally {
      this.busy = false;
      this.renderEditPanel();
    }
  }

  private async runUndo(): Promise<void> {
    if (this.busy) return;
    this.busy = true;
    this.renderEditPanel();
    try {
      await this.hooks.undo();
    } finally {
      this.busy = false;
      this.renderEditPanel();
    }
  }

  private onKey(event: KeyboardEvent): void {
    if (!this.visible || !this.editState.editable) return;
    // Keys typed in a dialog (the token dialog) belong to it, not to the plot behind it.
    if (document.querySelector('dialog[open]')) return;
    const target = event.target as HTMLElement | null;
    if (target && (target.tagName === 'INPUT' || target.tagName === 'SELECT' || target.tagName === 'TEXTAREA')) return;
    if ((event.ctrlKey || event.metaKey) && event.key.toLowerCase() === 'z') {
      event.preventDefault();
      void this.runUndo();
    } else if (event.ctrlKey || event.metaKey || event.altKey) {
      return;
    } else if (/^[1-9]$/.test(event.key) && this.selection.size > 0) {
      void this.assignSelection(Number(event.key));
    } else if (event.key.toLowerCase() === 'x' && this.selection.size > 0) {
      void this.assignSelection('exclude');
    } else if (event.key.toLowerCase() === 'a' && this.selection.size > 0) {
      void this.assignSelection('automatic');
    } else if (event.key === 'Escape' && this.selection.size > 0) {
      this.setSelection(new Set());
    }
  }

  /** Labels on by the user's choice, else while few shots are shown (more would hide the picks). */
  private showLabels(): boolean {
    if (this.labelChoice !== null) return this.labelChoice;
    const shown = (this.result?.shots.length ?? 0) - this.hiddenShots.size;
    return shown <= AUTO_LABEL_SHOTS;
  }

  private options(): TravelTimeOptions {
    return {
      hiddenShots: this.hiddenShots, reductionVelocity: this.reductionVelocity, showLabels: this.showLabels(), dragMode: this.dragMode,
      uiRevision: this.uiRevision, allowWebgl: this.webgl, breakpointMarker: this.breakpointMarker(), editRevision: this.drawCount,
    };
  }

  /** Draw (or redraw) the plot; draws are queued so that a fast sequence of changes ends in the last state. */
  private draw(): Promise<void> {
    this.drawing = this.drawing.then(() => this.drawNow()).catch((error: unknown) => {
      replaceChildren(this.plot, h('p', { class: 'upload-refused' }, `The plot could not be drawn: ${error instanceof Error ? error.message : String(error)}`));
    });
    return this.drawing;
  }

  private async drawNow(): Promise<void> {
    if (!this.result) return;
    const Plotly = await loadPlotly();
    this.drawCount += 1;
    const figure = travelTimeFigure(this.result, this.picks, this.selection, this.options());
    this.plot.dataset['pointCount'] = String(figure.pointCount);
    this.plot.dataset['webgl'] = String(figure.webgl);
    const first = !this.plot.classList.contains('js-plotly-plot');
    await Plotly.react(this.plot, figure.data, figure.layout, {
      responsive: true, displaylogo: false, scrollZoom: true,
      modeBarButtonsToRemove: ['toImage', 'select2d', 'lasso2d', 'zoom2d', 'pan2d', 'sendDataToCloud'],
      // Nothing leaves the office network: no button that offers to upload a chart.
      showSendToCloud: false, showEditInChartStudio: false, showLink: false,
      edits: { shapePosition: true },
    });
    if (first) this.listen();
    this.plot.dataset['drawn'] = this.uiRevision + ':' + String(this.result.summary.pickCount) + ':' + String(Date.now());
  }

  private listen(): void {
    if (this.listening) return;
    this.listening = true;
    const plot = this.plot as unknown as { on: (event: string, handler: (payload: unknown) => void) => void };
    plot.on('plotly_selected', (payload) => {
      const points = (payload as { points?: { customdata?: unknown }[] } | undefined)?.points ?? [];
      const lines = new Set(points.map((point) => point.customdata).filter((line): line is number => typeof line === 'number'));
      if (lines.size === 0) return;
      this.setSelection(this.shiftHeld ? new Set([...this.selection, ...lines]) : lines);
    });
    plot.on('plotly_deselect', () => this.setSelection(new Set()));
    // The dotted breakpoint line dragged: its new position along the line is the new breakpoint.
    plot.on('plotly_relayout', (payload) => {
      const moved = (payload as Record<string, unknown>)['shapes[0].x0'];
      const point = this.result ? breakpointsOf(this.result)[this.chosenBreakpoint] : undefined;
      const shot = this.result?.shots.find((candidate) => candidate.id === point?.shot);
      if (typeof moved !== 'number' || !point || !shot) return;
      const offset = (point.side === 'forward' ? 1 : -1) * (moved - shot.sourceX);
      if (offset > 0) void this.moveBreakpoint(Number(offset.toPrecision(6)));
    });
    plot.on('plotly_click', (payload) => {
      const point = (payload as { points?: { customdata?: unknown }[] }).points?.[0];
      if (!point || typeof point.customdata !== 'number') return;
      const next = new Set(this.selection);
      if (next.has(point.customdata)) next.delete(point.customdata);
      else next.add(point.customdata);
      this.setSelection(next);
    });
  }

  private async resetZoom(): Promise<void> {
    const Plotly = await loadPlotly();
    await Plotly.relayout(this.plot, { 'xaxis.autorange': true, 'yaxis.autorange': true, 'yaxis2.autorange': true });
  }

  private async savePng(): Promise<void> {
    const Plotly = await loadPlotly();
    await Plotly.downloadImage(this.plot, { format: 'png', filename: `${this.hooks.fileStem()}-travel-times`, width: 1400, height: 800, scale: 1 });
  }
}
