/**
 * The shot-gather view: one gather of the survey at a time, its traces side by side by offset or
 * receiver position with time downward, drawn as wiggles (positive lobes filled) or as variable
 * density, with a display gain; the picks on the traces, each kind with its own marker and a
 * legend; and hand editing of the picks — click a trace to put its pick at the clicked time,
 * Alt- or Shift-click (or the Remove mode) to take it away. Edits are kept in this page, counted,
 * and saved together with "Save picks", which makes a new pick set and interprets it again
 * (`hooks.savePickEdits`); "Discard" drops them.
 *
 * Keys, with the figure focused: ← → select the neighbouring trace (Home, End: the first, the
 * last); ↑ ↓ move the selected trace's pick by one displayed sample (Shift: ten), or the cursor
 * when the trace has no pick; Enter or Space put the pick at the cursor; Delete or Backspace
 * remove it; Esc clears the selection.
 *
 * The canvas is hidden from assistive technology; the figure's text alternative is its summary
 * sentence, a live line that says what is selected, the list of the picker's notes and a table of
 * every trace's pick. The arithmetic is in gather-figure.ts.
 */
import { api } from './api.js';
import type { GatherDisplay, GatherSummary, PickEdit } from './api-types.js';
import { SELECTED_STYLE } from './branch-style.js';
import { h, keepingFocus, replaceChildren } from './dom.js';
import { plain } from './format.js';
import {
  densityRaster, GAIN_SLIDER, gainFromSlider, gatherLayout, gatherSummaryText, gatherTimeText, hitTest, markerAt, markerCounts, MARKER_STYLES,
  neighbourColumn, niceTicks, NO_PENDING_EDITS, positionToX, shownPicks, stepTime, timeToY, toPickEdits, traceNumber, wigglePath, withPlacement, withRemoval,
  type GatherDisplayMode, type GatherLayout, type MarkerKind, type PendingEdits, type ShownPick, type TraceAxis,
} from './gather-figure.js';
import { PLOT_THEME } from './plot-theme.js';

export type PickSaveOutcome = 'stored' | 'unchanged' | 'conflict' | 'failed';

export interface GatherViewHooks {
  /** Store the edits as the survey's next pick set (If-Match `version`) and interpret again; says how it ended. */
  readonly savePickEdits: (edits: PickEdit[], version: number, description: string) => Promise<PickSaveOutcome>;
  /** Report an error from a request (the token dialog is offered when it needs one). */
  readonly failed: (error: unknown, what: string) => void;
}

export interface GatherContext {
  readonly surveyId: string;
  readonly gathers: readonly GatherSummary[];
  /** Changes whenever the stored picks change: the gather shown is then fetched again. */
  readonly picksKey: string;
  readonly timeUnit: 'ms' | 's';
}

type ClickMode = 'place' | 'remove';

/** Halo drawn under every marker, so that it reads on black wiggles and both ends of the colour ramp. */
const MARKER_HALO = '#ffffff';
/** The wiggles and their fill. */
const WIGGLE_INK = PLOT_THEME.ink;
/** Marker radius, px: this, or less where the traces stand closer. */
const MARKER_RADIUS = 5.5;
/** A marker's tooltip shows within this distance of its centre, px. */
const HOVER_RADIUS = 8;
/** Arrow keys with Shift move a pick this many displayed samples. */
const BIG_STEP = 10;

const MARKER_ORDER: readonly MarkerKind[] = ['automatic', 'low-confidence', 'user', 'unsaved', 'rejected', 'removed', 'unsaved-removal'];

export class GatherView {
  readonly element: HTMLElement;
  private readonly toolbar: HTMLElement;
  private readonly frame: HTMLDivElement;
  private readonly canvas: HTMLCanvasElement;
  private readonly summary: HTMLElement;
  private readonly selectionLive: HTMLElement;
  private readonly editPanel: HTMLElement;
  private readonly editStatus: HTMLElement;
  private readonly legend: HTMLElement;
  private readonly notes: HTMLElement;
  private readonly table: HTMLElement;
  private context: GatherContext | null = null;
  private gatherId: string | null = null;
  private display: GatherDisplay | null = null;
  /** The (gather, picks) the display was fetched for. */
  private loadedKey = '';
  private loadTicket = 0;
  private loadError: string | null = null;
  private layout: GatherLayout | null = null;
  private shown: ShownPick[] = [];
  /** Unsaved edits, per survey: switching surveys and back keeps them. */
  private readonly pendingBySurvey = new Map<string, PendingEdits>();
  private mode: GatherDisplayMode = 'wiggle';
  private axis: TraceAxis = 'offset';
  private gainSetting: number = GAIN_SLIDER.initial;
  /** Seconds at the foot of the figure; null: the whole display. */
  private timeBottom: number | null = null;
  private clickMode: ClickMode = 'place';
  private selectedTrace: number | null = null;
  /** Keyboard cursor: the time Enter or Space places the pick at, seconds. */
  private cursorTime: number | null = null;
  private busy = false;
  private drawCount = 0;
  private drawQueued = false;

  constructor(private readonly hooks: GatherViewHooks) {
    this.toolbar = h('div', { class: 'plot-toolbar gather-toolbar', role: 'toolbar', 'aria-label': 'Shot gather controls' });
    this.canvas = h('canvas', { class: 'gather-canvas', 'aria-hidden': 'true' });
    this.summary = h('p', { class: 'gather-summary', id: 'gather-summary' });
    const help = h('p', { class: 'gather-help', id: 'gather-help' },
      'Click a trace to put its pick at that time; Alt- or Shift-click (or Remove mode) takes it away. ',
      'Keys: ← → trace, ↑ ↓ move the pick one sample (Shift: ten), Enter or Space place the pick at the cursor, Delete remove it.');
    this.frame = h('div', {
      class: 'gather-canvas-frame', id: 'gather-plot', tabindex: 0, role: 'application',
      'aria-roledescription': 'shot gather', 'aria-label': 'Shot gather', 'aria-describedby': 'gather-summary gather-help',
    }, this.canvas);
    this.selectionLive = h('p', { class: 'gather-selection', id: 'gather-selection', 'aria-live': 'polite' });
    this.editStatus = h('p', { class: 'pick-edit-status', id: 'pick-edit-status', 'aria-live': 'polite' });
    this.editPanel = h('section', { class: 'side-panel pick-edit-panel', 'aria-label': 'Pick edits' });
    this.legend = h('section', { class: 'side-panel gather-legend', 'aria-label': 'What the markers mean' });
    this.notes = h('section', { class: 'side-panel gather-notes', 'aria-label': 'Notes of the automatic picker' });
    this.table = h('details', { class: 'gather-table', id: 'gather-table' });
    this.element = h('section', { class: 'view gather-view', id: 'gather-view' },
      this.toolbar,
      h('div', { class: 'view-body' },
        h('div', { class: 'plot-frame' }, this.summary, this.frame, this.selectionLive, help),
        h('div', { class: 'side-column' }, this.editPanel, this.legend, this.notes)),
      this.table,
    );
    this.renderLegend();
    this.listen();
    new ResizeObserver(() => this.requestDraw()).observe(this.frame);
    // Unsaved edits are not lost by accident: leaving the page with some asks first.
    window.addEventListener('beforeunload', (event) => {
      if ([...this.pendingBySurvey.values()].some((pending) => pending.size > 0)) event.preventDefault();
    });
  }

  get visible(): boolean {
    return this.element.isConnected && !this.element.hidden;
  }

  /** Show the gathers of a survey: the one chosen before if it is still there, else the first; fetched again when the picks changed. */
  async show(context: GatherContext): Promise<void> {
    const surveyChanged = this.context?.surveyId !== context.surveyId;
    this.context = context;
    if (surveyChanged) {
      this.gatherId = null;
      this.selectedTrace = null;
      this.cursorTime = null;
      this.timeBottom = null;
    }
    if (!context.gathers.some((gather) => gather.id === this.gatherId)) {
      this.gatherId = context.gathers[0]?.id ?? null;
      this.selectedTrace = null;
      this.cursorTime = null;
    }
    this.renderAll();
    await this.load();
  }

  private get pending(): PendingEdits {
    return (this.context && this.pendingBySurvey.get(this.context.surveyId)) ?? NO_PENDING_EDITS;
  }

  private set pending(next: PendingEdits) {
    if (this.context) this.pendingBySurvey.set(this.context.surveyId, next);
  }

  private async load(): Promise<void> {
    const context = this.context;
    const gatherId = this.gatherId;
    if (!context || gatherId === null) return;
    const key = `${context.surveyId}:${gatherId}:${context.picksKey}`;
    if (key === this.loadedKey && this.display?.gather.id === gatherId) return;
    const ticket = ++this.loadTicket;
    this.loadError = null;
    this.frame.setAttribute('aria-busy', 'true');
    try {
      const display = await api.getGather(context.surveyId, gatherId);
      if (ticket !== this.loadTicket) return;
      this.display = display;
      this.loadedKey = key;
      if (this.selectedTrace !== null && !display.traces.some((trace) => trace.traceIndex === this.selectedTrace)) this.selectedTrace = null;
    } catch (error) {
      if (ticket !== this.loadTicket) return;
      this.display = null;
      this.loadedKey = '';
      this.loadError = error instanceof Error ? error.message : String(error);
      this.hooks.failed(error, 'showing the shot gather');
    } finally {
      if (ticket === this.loadTicket) this.frame.removeAttribute('aria-busy');
    }
    this.renderAll();
  }

  private renderAll(): void {
    keepingFocus(this.element, () => {
      this.refreshPicks();
      this.renderToolbar();
      this.renderEditPanel();
      this.renderNotes();
      this.renderTable();
    });
    this.renderSummary();
    this.requestDraw();
  }

  /** The display of the chosen gather, when it is the one in hand. */
  private current(): GatherDisplay | null {
    return this.display !== null && this.display.gather.id === this.gatherId ? this.display : null;
  }

  private refreshPicks(): void {
    const display = this.current();
    this.shown = display ? shownPicks(display, this.pending) : [];
  }

  private unsavedHere(): number {
    const gatherId = this.gatherId;
    return [...this.pending.values()].filter((entry) => entry.gatherId === gatherId).length;
  }

  private timeText(time: number): string {
    const unit = this.context?.timeUnit ?? 'ms';
    return `${gatherTimeText(time, unit, this.current()?.sampleInterval ?? 0.001)} ${unit}`;
  }

  // ------------------------------------------------------------ controls

  private renderToolbar(): void {
    const context = this.context;
    if (!context) return;
    const select = h('select', { id: 'gather-select', 'aria-label': 'Shot gather shown' },
      ...context.gathers.map((gather) => h('option', { value: gather.id, selected: gather.id === this.gatherId },
        `Shot ${gather.shot} · ${gather.fileName} · ${gather.traceCount} traces, ${gather.pickCount} picks`)));
    select.addEventListener('change', () => {
      this.gatherId = select.value;
      this.selectedTrace = null;
      this.cursorTime = null;
      this.renderAll();
      void this.load();
    });
    const segmented = (label: string, options: readonly { id: string; text: string; title: string; pressed: boolean; choose: () => void }[]) =>
      h('div', { class: 'segmented', role: 'group', 'aria-label': label },
        ...options.map((option) => h('button', {
          type: 'button', id: option.id, 'aria-pressed': String(option.pressed), title: option.title,
          onclick: () => {
            option.choose();
            this.renderAll();
          },
        }, option.text)));
    const display = segmented('Trace display', [
      { id: 'gather-mode-wiggle', text: 'Wiggle', title: 'Each trace as a line, its positive half filled', pressed: this.mode === 'wiggle', choose: () => { this.mode = 'wiggle'; } },
      { id: 'gather-mode-density', text: 'Variable density', title: 'Each trace as a band of colour: teal troughs, brown peaks', pressed: this.mode === 'density', choose: () => { this.mode = 'density'; } },
    ]);
    const axis = segmented('Traces placed by', [
      { id: 'gather-axis-offset', text: 'Offset', title: 'Across the figure by distance from the shot (negative on the near side of the line)', pressed: this.axis === 'offset', choose: () => { this.axis = 'offset'; } },
      { id: 'gather-axis-receiver', text: 'Receiver position', title: 'Across the figure by position along the line', pressed: this.axis === 'receiver', choose: () => { this.axis = 'receiver'; } },
    ]);
    const gainText = () => `×${plain(gainFromSlider(this.gainSetting), 2)}`;
    const gainValue = h('output', { id: 'gather-gain-value', for: 'gather-gain' }, gainText());
    const gain = h('input', {
      type: 'range', id: 'gather-gain', min: GAIN_SLIDER.min, max: GAIN_SLIDER.max, step: GAIN_SLIDER.step, value: String(this.gainSetting),
      'aria-valuetext': gainText(), title: 'Display gain: amplitudes are multiplied by it, and clipped at one trace spacing',
      oninput: () => {
        this.gainSetting = Number(gain.value);
        gain.setAttribute('aria-valuetext', gainText());
        gainValue.textContent = gainText();
        this.requestDraw();
      },
    });
    const unit = context.timeUnit;
    const factor = unit === 'ms' ? 1000 : 1;
    const timeTo = h('input', {
      type: 'number', id: 'gather-time-to', class: 'narrow', min: 0, step: 'any',
      value: this.timeBottom === null ? '' : String(Number((this.timeBottom * factor).toPrecision(6))),
      placeholder: 'all', title: 'Show the traces down to this time (empty: the whole display)',
      onchange: () => {
        const typed = timeTo.value.trim() === '' ? null : Number(timeTo.value) / factor;
        this.timeBottom = typed !== null && Number.isFinite(typed) && typed > 0 ? typed : null;
        this.requestDraw();
      },
    });
    const clicks = segmented('A click on a trace', [
      { id: 'gather-click-place', text: 'Place pick', title: 'A click puts the trace\u2019s pick at the clicked time', pressed: this.clickMode === 'place', choose: () => { this.clickMode = 'place'; } },
      { id: 'gather-click-remove', text: 'Remove pick', title: 'A click takes the trace\u2019s pick away (Alt- or Shift-click does so in either mode)', pressed: this.clickMode === 'remove', choose: () => { this.clickMode = 'remove'; } },
    ]);
    replaceChildren(this.toolbar,
      h('label', { class: 'check', for: 'gather-select' }, 'Gather ', select),
      display, axis,
      h('label', { class: 'check gain-control', for: 'gather-gain' }, 'Gain ', gain, ' ', gainValue),
      h('label', { class: 'check', for: 'gather-time-to' }, 'Down to ', timeTo, ` ${unit}`),
      h('span', { class: 'toolbar-spacer' }),
      clicks,
    );
  }

  private renderEditPanel(): void {
    const count = this.pending.size;
    const here = this.unsavedHere();
    this.editStatus.textContent = count === 0
      ? 'No unsaved pick edits.'
      : `${count} unsaved pick edit${count === 1 ? '' : 's'}${here !== count ? ` (${here} on this gather)` : ''}.`;
    replaceChildren(this.editPanel,
      h('h3', {}, 'Pick edits'),
      this.editStatus,
      h('div', { class: 'button-row' },
        h('button', { type: 'button', id: 'save-picks', disabled: count === 0 || this.busy, onclick: () => void this.save(), title: 'Store the edited picks as a new pick set and interpret them again' }, 'Save picks'),
        h('button', { type: 'button', id: 'discard-picks', disabled: count === 0 || this.busy, onclick: () => this.discard(), title: 'Drop the edits not saved yet' }, 'Discard'),
      ),
      h('p', { class: 'quiet small' }, 'Saving makes a new pick set for the survey (the earlier ones are kept) and interprets it as a new revision.'),
      h('p', { class: 'gather-caution' }, 'Automatic picks are suggestions: check each against its trace. A first break picked early or late moves the velocities and depths computed from it.'),
    );
  }

  private renderLegend(): void {
    replaceChildren(this.legend,
      h('h3', {}, 'Markers'),
      h('ul', { class: 'marker-legend' }, ...MARKER_ORDER.map((kind) => h('li', { 'data-marker': kind },
        markerSwatch(kind),
        h('span', {}, h('strong', {}, MARKER_STYLES[kind].label), h('span', { class: 'marker-description' }, MARKER_STYLES[kind].description))))),
      h('p', { class: 'quiet small' }, 'The selected trace is shaded, with its pick ringed and the keyboard cursor dashed across it.'),
    );
  }

  /** The picker's notes on this gather (rejected candidates and doubtful picks), each a button that selects its trace. */
  private renderNotes(): void {
    const display = this.current();
    const noted = this.shown.filter((pick) => pick.note !== null && pick.kind !== null);
    const traceOf = new Map(display?.traces.map((trace) => [trace.traceIndex, trace]) ?? []);
    replaceChildren(this.notes,
      h('h3', {}, 'Picker notes'),
      noted.length === 0
        ? h('p', { class: 'quiet small' }, display ? 'The automatic picker left no notes on this gather.' : '')
        : h('ul', { class: 'gather-note-list', id: 'gather-notes' }, ...noted.map((pick) => {
          const trace = traceOf.get(pick.traceIndex);
          return h('li', { 'data-trace': pick.traceIndex },
            h('button', { type: 'button', class: 'link-button', onclick: () => this.select(pick.traceIndex, pick.time, true) },
              `Trace ${traceNumber(pick.traceIndex)}${trace ? ` (${trace.receiver}, offset ${plain(trace.offset)} m)` : ''}`),
            `: ${MARKER_STYLES[pick.kind!].label.toLowerCase()}${pick.time !== null ? ` at ${this.timeText(pick.time)}` : ''} — ${pick.note}`);
        })),
    );
  }

  /** Every trace's pick as a table: the text alternative of the figure. */
  private renderTable(): void {
    const display = this.current();
    const open = this.table.hasAttribute('open');
    if (!display) {
      replaceChildren(this.table, h('summary', {}, 'Picks of this gather, as a table'));
      return;
    }
    const unit = this.context?.timeUnit ?? 'ms';
    const byTrace = new Map(this.shown.map((pick) => [pick.traceIndex, pick]));
    replaceChildren(this.table,
      h('summary', {}, `Picks of shot ${display.gather.shot}, as a table (${display.traces.length} traces)`),
      h('table', { class: 'gather-pick-table' },
        h('caption', {}, `Shot ${display.gather.shot} at ${plain(display.gather.sourceX)} m: the pick of every trace`),
        h('thead', {}, h('tr', {}, ...['Trace', 'Receiver', 'Position (m)', 'Offset (m)', 'Pick', `Time (${unit})`, 'Confidence', 'Note'].map((title) => h('th', { scope: 'col' }, title)))),
        h('tbody', {}, ...display.traces.map((trace) => {
          const pick = byTrace.get(trace.traceIndex);
          return h('tr', { 'data-trace': trace.traceIndex },
            h('td', { class: 'number' }, String(traceNumber(trace.traceIndex))),
            h('td', {}, trace.receiver),
            h('td', { class: 'number' }, plain(trace.receiverX)),
            h('td', { class: 'number' }, plain(trace.offset)),
            h('td', {}, pick?.kind ? MARKER_STYLES[pick.kind].label : 'no pick'),
            h('td', { class: 'number' }, pick?.time !== null && pick?.time !== undefined ? gatherTimeText(pick.time, unit, display.sampleInterval) : '—'),
            h('td', { class: 'number' }, pick?.confidence !== null && pick?.confidence !== undefined ? pick.confidence.toFixed(2) : '—'),
            h('td', {}, pick?.note ?? ''));
        })),
      ),
    );
    if (open) this.table.setAttribute('open', '');
  }

  private renderSummary(): void {
    const display = this.current();
    if (!display) {
      this.summary.textContent = this.loadError ? `The shot gather could not be shown: ${this.loadError}` : this.gatherId === null ? 'This survey has no shot gathers.' : 'Loading the shot gather…';
      this.frame.setAttribute('aria-label', 'Shot gather');
      return;
    }
    const text = gatherSummaryText(display.gather.shot, this.shown, this.unsavedHere());
    this.summary.textContent = `${text}.`;
    this.frame.setAttribute('aria-label', `Shot gather of shot ${display.gather.shot}, ${this.mode === 'wiggle' ? 'wiggle' : 'variable-density'} display: select a trace with the arrow keys`);
    const counts = markerCounts(this.shown);
    this.frame.dataset['markers'] = JSON.stringify(counts);
  }

  /** Say what is selected, in the live line. */
  private announce(): void {
    const display = this.current();
    const trace = display?.traces.find((entry) => entry.traceIndex === this.selectedTrace);
    if (!display || !trace) {
      this.selectionLive.textContent = display ? 'No trace selected: click a trace, or focus the figure and press → .' : '';
      return;
    }
    const pick = this.shown.find((entry) => entry.traceIndex === trace.traceIndex);
    const what = pick?.kind && pick.time !== null
      ? `${MARKER_STYLES[pick.kind].label.toLowerCase()} at ${this.timeText(pick.time)}${pick.confidence !== null && pick.kind !== 'unsaved' ? `, confidence ${pick.confidence.toFixed(2)}` : ''}`
      : 'no pick';
    const cursor = this.cursorTime !== null ? `; cursor at ${this.timeText(this.cursorTime)}` : '';
    this.selectionLive.textContent = `Trace ${traceNumber(trace.traceIndex)} (receiver ${trace.receiver} at ${plain(trace.receiverX)} m, offset ${plain(trace.offset)} m): ${what}${cursor}.`;
  }

  // ------------------------------------------------------------ editing

  private storedPick(traceIndex: number) {
    return this.current()?.picks.find((pick) => pick.traceIndex === traceIndex);
  }

  private sampleCount(traceIndex: number): number {
    return this.current()?.traces.find((trace) => trace.traceIndex === traceIndex)?.samples.length ?? 0;
  }

  private place(traceIndex: number, time: number): void {
    const display = this.current();
    if (!display || this.busy) return;
    this.pending = withPlacement(this.pending, display.gather.id, traceIndex, time, this.storedPick(traceIndex));
    this.select(traceIndex, time, false);
    this.renderAll();
  }

  private remove(traceIndex: number): void {
    const display = this.current();
    if (!display || this.busy) return;
    this.pending = withRemoval(this.pending, display.gather.id, traceIndex, this.storedPick(traceIndex));
    this.select(traceIndex, this.cursorTime, false);
    this.renderAll();
  }

  /** Select a trace; `focus`: move the keyboard focus to the figure (from a note's button). */
  private select(traceIndex: number, cursorTime: number | null, focus: boolean): void {
    this.selectedTrace = traceIndex;
    this.cursorTime = cursorTime ?? this.shown.find((pick) => pick.traceIndex === traceIndex)?.time ?? this.cursorTime ?? this.current()?.startTime ?? null;
    this.refreshPicks();
    this.announce();
    this.requestDraw();
    if (focus) this.frame.focus();
  }

  private discard(): void {
    this.pending = NO_PENDING_EDITS;
    this.renderAll();
    this.announce();
  }

  private async save(): Promise<void> {
    const display = this.current();
    const context = this.context;
    const edits = toPickEdits(this.pending);
    if (!display || !context || edits.length === 0 || this.busy) return;
    const shots = [...new Set(edits.map((edit) => context.gathers.find((gather) => gather.id === edit.gatherId)?.shot ?? edit.gatherId))];
    const description = `${edits.length} pick edit${edits.length === 1 ? '' : 's'} on shot${shots.length === 1 ? '' : 's'} ${shots.join(', ')}`;
    const surveyId = context.surveyId;
    const saved = this.pending;
    this.busy = true;
    this.renderEditPanel();
    try {
      const outcome = await this.hooks.savePickEdits(edits, display.version, description);
      // Stored: these edits are in the pick set now (edits made meanwhile, if any, stay).
      if (outcome === 'stored' || outcome === 'unchanged') {
        const left = new Map(this.pendingBySurvey.get(surveyId) ?? NO_PENDING_EDITS);
        for (const [key, entry] of saved) if (left.get(key) === entry) left.delete(key);
        this.pendingBySurvey.set(surveyId, left);
      }
    } finally {
      this.busy = false;
      this.renderAll();
    }
  }

  // ------------------------------------------------------------ pointer and keys

  private listen(): void {
    const local = (event: MouseEvent) => {
      const box = this.canvas.getBoundingClientRect();
      return { x: event.clientX - box.left, y: event.clientY - box.top };
    };
    this.canvas.addEventListener('click', (event) => {
      const display = this.current();
      if (!display || !this.layout) return;
      const { x, y } = local(event);
      const hit = hitTest(this.layout, display.traces, x, y);
      if (!hit) return;
      this.frame.focus({ preventScroll: true });
      if (this.clickMode === 'remove' || event.altKey || event.shiftKey) this.remove(hit.traceIndex);
      else this.place(hit.traceIndex, hit.time);
    });
    this.canvas.addEventListener('mousemove', (event) => {
      if (!this.layout) return;
      const { x, y } = local(event);
      const marker = markerAt(this.layout, this.shown, x, y, HOVER_RADIUS);
      const title = marker?.kind && marker.time !== null
        ? `Trace ${traceNumber(marker.traceIndex)}: ${MARKER_STYLES[marker.kind].label.toLowerCase()} at ${this.timeText(marker.time)}${marker.confidence !== null ? `, confidence ${marker.confidence.toFixed(2)}` : ''}${marker.note ? ` — ${marker.note}` : ''}`
        : '';
      if (this.frame.title !== title) this.frame.title = title;
    });
    this.frame.addEventListener('keydown', (event) => this.onKey(event));
    this.frame.addEventListener('focus', () => this.announce());
  }

  private onKey(event: KeyboardEvent): void {
    const display = this.current();
    const layout = this.layout;
    if (!display || !layout || layout.columns.length === 0 || event.ctrlKey || event.metaKey) return;
    const selected = this.selectedTrace;
    const across = (steps: number | 'first' | 'last') => {
      const column = steps === 'first' ? layout.columns[0] : steps === 'last' ? layout.columns[layout.columns.length - 1]
        : selected === null ? layout.columns[steps > 0 ? 0 : layout.columns.length - 1] : neighbourColumn(layout, selected, steps);
      if (column) this.select(column.traceIndex, this.shown.find((pick) => pick.traceIndex === column.traceIndex && pick.picked)?.time ?? this.cursorTime, false);
    };
    let handled = true;
    switch (event.key) {
      case 'ArrowRight': across(1); break;
      case 'ArrowLeft': across(-1); break;
      case 'Home': across('first'); break;
      case 'End': across('last'); break;
      case 'ArrowUp':
      case 'ArrowDown': {
        if (selected === null) {
          across(1);
          break;
        }
        const steps = (event.key === 'ArrowDown' ? 1 : -1) * (event.shiftKey ? BIG_STEP : 1);
        const pick = this.shown.find((entry) => entry.traceIndex === selected);
        const count = this.sampleCount(selected);
        if (pick?.picked && pick.time !== null) this.place(selected, stepTime(layout, pick.time, steps, count));
        else {
          this.cursorTime = stepTime(layout, this.cursorTime ?? display.startTime, steps, count);
          this.announce();
          this.requestDraw();
        }
        break;
      }
      case 'Enter':
      case ' ':
        if (selected !== null && this.cursorTime !== null) this.place(selected, stepTime(layout, this.cursorTime, 0, this.sampleCount(selected)));
        break;
      case 'Delete':
      case 'Backspace':
        if (selected !== null) this.remove(selected);
        break;
      case 'Escape':
        if (selected === null) handled = false;
        else {
          this.selectedTrace = null;
          this.announce();
          this.requestDraw();
        }
        break;
      default:
        handled = false;
    }
    if (handled) event.preventDefault();
  }

  // ------------------------------------------------------------ drawing

  private requestDraw(): void {
    if (this.drawQueued) return;
    this.drawQueued = true;
    requestAnimationFrame(() => {
      this.drawQueued = false;
      this.draw();
    });
  }

  private draw(): void {
    const cssWidth = this.frame.clientWidth;
    const cssHeight = this.frame.clientHeight;
    const context2d = this.canvas.getContext('2d');
    if (!context2d || cssWidth < 120 || cssHeight < 120) return;
    const scale = window.devicePixelRatio || 1;
    this.canvas.width = Math.round(cssWidth * scale);
    this.canvas.height = Math.round(cssHeight * scale);
    this.canvas.style.width = `${cssWidth}px`;
    this.canvas.style.height = `${cssHeight}px`;
    const ctx = context2d;
    ctx.setTransform(scale, 0, 0, scale, 0, 0);
    ctx.fillStyle = PLOT_THEME.paper;
    ctx.fillRect(0, 0, cssWidth, cssHeight);
    const display = this.current();
    if (!display || display.traces.length === 0) {
      this.layout = null;
      ctx.fillStyle = PLOT_THEME.muted;
      ctx.font = `14px ${PLOT_THEME.font}`;
      ctx.fillText(display ? 'This gather has no traces.' : (this.summary.textContent ?? ''), 20, 32);
      return;
    }
    const layout = gatherLayout(display, { width: cssWidth, height: cssHeight }, { axis: this.axis, timeBottom: this.timeBottom });
    this.layout = layout;
    const { box } = layout;
    const gain = gainFromSlider(this.gainSetting);
    ctx.fillStyle = PLOT_THEME.plot;
    ctx.fillRect(box.left, box.top, box.width, box.height);
    this.drawAxes(ctx, layout);

    ctx.save();
    ctx.beginPath();
    ctx.rect(box.left, box.top, box.width, box.height);
    ctx.clip();
    const selectedColumn = layout.columns.find((column) => column.traceIndex === this.selectedTrace);
    if (selectedColumn) {
      ctx.fillStyle = 'rgba(194, 24, 91, 0.10)';
      ctx.fillRect(selectedColumn.left, box.top, selectedColumn.right - selectedColumn.left, box.height);
    }
    if (this.mode === 'density') this.drawDensity(ctx, layout, display, gain, scale);
    else this.drawWiggles(ctx, layout, display, gain);
    if (selectedColumn) {
      // The column's edges, over the traces: the shading alone is hidden under variable density.
      ctx.strokeStyle = SELECTED_STYLE.color;
      ctx.globalAlpha = 0.55;
      ctx.lineWidth = 1;
      ctx.strokeRect(selectedColumn.left + 0.5, box.top - 1, selectedColumn.right - selectedColumn.left - 1, box.height + 2);
      ctx.globalAlpha = 1;
    }
    this.drawMarkers(ctx, layout, selectedColumn?.traceIndex ?? null);
    if (selectedColumn && this.cursorTime !== null) {
      const y = timeToY(layout, this.cursorTime);
      ctx.strokeStyle = SELECTED_STYLE.color;
      ctx.lineWidth = 1.5;
      ctx.setLineDash([4, 3]);
      ctx.beginPath();
      ctx.moveTo(selectedColumn.left + 1, y);
      ctx.lineTo(selectedColumn.right - 1, y);
      ctx.stroke();
      ctx.setLineDash([]);
    }
    ctx.restore();
    ctx.strokeStyle = PLOT_THEME.muted;
    ctx.lineWidth = 1;
    ctx.strokeRect(box.left + 0.5, box.top + 0.5, box.width - 1, box.height - 1);

    this.drawCount += 1;
    // For tests and tools: where the traces and times are (CSS px of the canvas), and a stamp per draw.
    this.frame.dataset['geometry'] = JSON.stringify({
      box, timeTop: layout.timeTop, timeBottom: layout.timeBottom, columns: layout.columns.map((column) => [column.traceIndex, Number(column.x.toFixed(2))]),
    });
    this.frame.dataset['drawn'] = `${display.gather.id}:${this.loadedKey}:${this.mode}:${this.drawCount}`;
  }

  private drawAxes(ctx: CanvasRenderingContext2D, layout: GatherLayout): void {
    const { box } = layout;
    const unit = this.context?.timeUnit ?? 'ms';
    const factor = unit === 'ms' ? 1000 : 1;
    ctx.font = `12px ${PLOT_THEME.font}`;
    ctx.textBaseline = 'middle';
    ctx.textAlign = 'right';
    ctx.lineWidth = 1;
    for (const tick of niceTicks(layout.timeTop * factor, layout.timeBottom * factor, Math.max(2, Math.floor(box.height / 48)))) {
      const y = Math.round(timeToY(layout, tick / factor)) + 0.5;
      ctx.strokeStyle = PLOT_THEME.grid;
      ctx.beginPath();
      ctx.moveTo(box.left, y);
      ctx.lineTo(box.left + box.width, y);
      ctx.stroke();
      ctx.fillStyle = PLOT_THEME.ink;
      ctx.fillText(String(tick), box.left - 6, y);
    }
    ctx.save();
    ctx.translate(14, box.top + box.height / 2);
    ctx.rotate(-Math.PI / 2);
    ctx.textAlign = 'center';
    ctx.fillStyle = PLOT_THEME.muted;
    ctx.fillText(`Time after the shot (${unit})`, 0, 0);
    ctx.restore();

    const leftPosition = layout.positionAtLeft;
    const rightPosition = leftPosition + box.width / layout.pxPerMetre;
    ctx.textAlign = 'center';
    ctx.textBaseline = 'bottom';
    ctx.fillStyle = PLOT_THEME.ink;
    for (const tick of niceTicks(leftPosition, rightPosition, Math.max(2, Math.floor(box.width / 90)))) {
      const x = positionToX(layout, tick);
      ctx.fillRect(Math.round(x), box.top - 5, 1, 5);
      ctx.fillText(String(tick), x, box.top - 6);
    }
    ctx.textAlign = 'left';
    ctx.fillStyle = PLOT_THEME.muted;
    ctx.fillText(this.axis === 'offset' ? 'Offset from the shot (m)' : 'Receiver position (m)', box.left, 14);
  }

  private drawWiggles(ctx: CanvasRenderingContext2D, layout: GatherLayout, display: GatherDisplay, gain: number): void {
    ctx.fillStyle = WIGGLE_INK;
    ctx.strokeStyle = WIGGLE_INK;
    ctx.lineWidth = 0.8;
    for (const column of layout.columns) {
      const samples = display.traces[column.arrayIndex]?.samples ?? [];
      const { line, fills } = wigglePath(layout, column, samples, gain);
      ctx.beginPath();
      for (const polygon of fills) {
        ctx.moveTo(polygon[0]!, polygon[1]!);
        for (let k = 2; k < polygon.length; k += 2) ctx.lineTo(polygon[k]!, polygon[k + 1]!);
        ctx.closePath();
      }
      ctx.fill();
      ctx.beginPath();
      for (let k = 0; k < line.length; k += 2) {
        if (k === 0) ctx.moveTo(line[k]!, line[k + 1]!);
        else ctx.lineTo(line[k]!, line[k + 1]!);
      }
      ctx.stroke();
    }
  }

  private drawDensity(ctx: CanvasRenderingContext2D, layout: GatherLayout, display: GatherDisplay, gain: number, scale: number): void {
    const raster = densityRaster(layout, display.traces, gain, scale);
    const offscreen = document.createElement('canvas');
    offscreen.width = raster.width;
    offscreen.height = raster.height;
    const offscreenContext = offscreen.getContext('2d');
    if (!offscreenContext) return;
    offscreenContext.putImageData(new ImageData(raster.pixels, raster.width, raster.height), 0, 0);
    ctx.imageSmoothingEnabled = false;
    ctx.drawImage(offscreen, layout.box.left, layout.box.top, layout.box.width, layout.box.height);
  }

  private drawMarkers(ctx: CanvasRenderingContext2D, layout: GatherLayout, selected: number | null): void {
    const radius = Math.max(3, Math.min(MARKER_RADIUS, layout.spacingPx * 0.42));
    const columnOf = new Map(layout.columns.map((column) => [column.traceIndex, column]));
    for (const pick of this.shown) {
      const column = columnOf.get(pick.traceIndex);
      if (!column || pick.kind === null || pick.time === null) continue;
      const y = timeToY(layout, pick.time);
      drawMarker(ctx, pick.kind, column.x, y, radius);
      if (pick.traceIndex === selected) {
        ctx.strokeStyle = SELECTED_STYLE.color;
        ctx.lineWidth = 2;
        ctx.beginPath();
        ctx.arc(column.x, y, radius + 4, 0, 2 * Math.PI);
        ctx.stroke();
      }
    }
  }
}

/** The path of a marker's shape around (x, y). */
function shapePath(ctx: CanvasRenderingContext2D, kind: MarkerKind, x: number, y: number, radius: number): void {
  ctx.beginPath();
  switch (MARKER_STYLES[kind].shape) {
    case 'disc':
    case 'ring':
      ctx.arc(x, y, radius, 0, 2 * Math.PI);
      break;
    case 'triangle':
      ctx.moveTo(x, y - radius * 1.2);
      ctx.lineTo(x + radius * 1.1, y + radius * 0.8);
      ctx.lineTo(x - radius * 1.1, y + radius * 0.8);
      ctx.closePath();
      break;
    case 'square':
    case 'square-dot':
      ctx.rect(x - radius * 0.9, y - radius * 0.9, radius * 1.8, radius * 1.8);
      break;
    case 'cross':
    case 'cross-ring':
      ctx.moveTo(x - radius * 0.8, y - radius * 0.8);
      ctx.lineTo(x + radius * 0.8, y + radius * 0.8);
      ctx.moveTo(x + radius * 0.8, y - radius * 0.8);
      ctx.lineTo(x - radius * 0.8, y + radius * 0.8);
      break;
  }
}

/** One marker: its shape over a white halo, filled when its style has a fill, then edged. */
function drawMarker(ctx: CanvasRenderingContext2D, kind: MarkerKind, x: number, y: number, radius: number): void {
  const style = MARKER_STYLES[kind];
  shapePath(ctx, kind, x, y, radius);
  ctx.strokeStyle = MARKER_HALO;
  ctx.lineWidth = 4.5;
  ctx.stroke();
  if (style.fill) {
    ctx.fillStyle = style.fill;
    ctx.fill();
  }
  ctx.strokeStyle = style.stroke;
  ctx.lineWidth = style.fill ? 1.2 : 2;
  ctx.stroke();
  if (style.shape === 'square-dot') {
    ctx.beginPath();
    ctx.arc(x, y, radius * 0.35, 0, 2 * Math.PI);
    ctx.fillStyle = style.stroke;
    ctx.fill();
  }
  if (style.shape === 'cross-ring') {
    ctx.beginPath();
    ctx.arc(x, y, radius * 1.15, 0, 2 * Math.PI);
    ctx.lineWidth = 1.2;
    ctx.stroke();
  }
}

const SVG = 'http://www.w3.org/2000/svg';

/** The marker of `kind` as a small SVG for the legend (decorative: the label says it). */
function markerSwatch(kind: MarkerKind): SVGSVGElement {
  const style = MARKER_STYLES[kind];
  const svg = document.createElementNS(SVG, 'svg');
  svg.setAttribute('viewBox', '-8 -8 16 16');
  svg.setAttribute('width', '18');
  svg.setAttribute('height', '18');
  svg.setAttribute('aria-hidden', 'true');
  svg.setAttribute('class', 'marker-swatch');
  const add = (tag: string, attributes: Record<string, string | number>) => {
    const element = document.createElementNS(SVG, tag);
    for (const [name, value] of Object.entries(attributes)) element.setAttribute(name, String(value));
    svg.append(element);
  };
  const paint = { fill: style.fill ?? 'none', stroke: style.stroke, 'stroke-width': style.fill ? 1.2 : 2 };
  const radius = 5;
  switch (style.shape) {
    case 'disc':
    case 'ring':
      add('circle', { cx: 0, cy: 0, r: radius, ...paint });
      break;
    case 'triangle':
      add('polygon', { points: `0,${-radius * 1.2} ${radius * 1.1},${radius * 0.8} ${-radius * 1.1},${radius * 0.8}`, ...paint });
      break;
    case 'square':
    case 'square-dot':
      add('rect', { x: -radius * 0.9, y: -radius * 0.9, width: radius * 1.8, height: radius * 1.8, ...paint });
      if (style.shape === 'square-dot') add('circle', { cx: 0, cy: 0, r: radius * 0.35, fill: style.stroke });
      break;
    case 'cross':
    case 'cross-ring':
      add('path', { d: `M${-radius * 0.8},${-radius * 0.8}L${radius * 0.8},${radius * 0.8}M${radius * 0.8},${-radius * 0.8}L${-radius * 0.8},${radius * 0.8}`, ...paint, fill: 'none' });
      if (style.shape === 'cross-ring') add('circle', { cx: 0, cy: 0, r: radius * 1.15, fill: 'none', stroke: style.stroke, 'stroke-width': 1.2 });
      break;
  }
  return svg;
}
