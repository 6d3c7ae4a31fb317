/**
 * The workspace: the page a practitioner works in. Survey panel on the left; the open survey's
 * travel-time or depth view; its layer and shot tables, warnings and cautions underneath; a notice
 * when a colleague has made a newer revision; the access-token dialog when the server asks for one.
 *
 * State lives here and only here: the open survey, the revision shown, the stored picks, the undo
 * history of this session's edits. Every change of revision updates the address bar, so the URL
 * in it is always one a colleague can open.
 */
import { api, downloadFromService, ServiceError, storeToken, storedToken } from './api.js';
import type { BranchEdit, CurrentPicks, GatherSummary, PickEdit, Revision, RevisionSummary, Survey } from './api-types.js';
import { effectiveEdits, inverseEdits } from './branch-editing.js';
import { DepthView } from './depth-view.js';
import { h, keepingFocus, replaceChildren } from './dom.js';
import { GatherView } from './gather-view.js';
import { shortDateTime } from './format.js';
import { cautionList, crustalProfileResults, layerTable, referenceList, shotTable, surveyWarnings } from './results-view.js';
import { parseRoute, paths, type Route } from './routes.js';
import { SurveyPanel } from './survey-panel.js';
import { TravelTimeView } from './travel-time-view.js';

/** How often the page asks whether a colleague made a newer revision, ms. */
const REVISION_POLL_MS = 10_000;

type ViewName = 'travel-times' | 'depth' | 'gathers';

const capitalised = (text: string) => text.charAt(0).toUpperCase() + text.slice(1);

/** The survey changed last (ISO timestamps sort as text). */
function mostRecentlyChanged(surveys: readonly Survey[]): Survey | undefined {
  return [...surveys].sort((left, right) => right.updatedAt.localeCompare(left.updatedAt))[0];
}

/** How an edit ended: stored, nothing to store, refused as stale (picks changed elsewhere), or not stored. */
type EditOutcome = 'stored' | 'unchanged' | 'conflict' | 'failed';

interface UndoStep {
  readonly description: string;
  readonly edits: BranchEdit[];
}

export class Workspace {
  private readonly root: HTMLElement;
  private readonly panel: SurveyPanel;
  private readonly travelTimes: TravelTimeView;
  private readonly depth: DepthView;
  private readonly gatherView: GatherView;
  private readonly title: HTMLElement;
  private readonly revisionPicker: HTMLElement;
  private readonly tabs: HTMLElement;
  private readonly actions: HTMLElement;
  private readonly notice: HTMLElement;
  private readonly problems: HTMLElement;
  private readonly status: HTMLElement;
  private readonly viewHolder: HTMLElement;
  private readonly results: HTMLElement;
  private readonly tokenDialog: HTMLDialogElement;
  private survey: Survey | null = null;
  private revisions: RevisionSummary[] = [];
  private revision: Revision | null = null;
  private picks: CurrentPicks | null = null;
  /** The open survey's shot gathers (none for a survey made from a pick table). */
  private gathers: readonly GatherSummary[] = [];
  private view: ViewName = 'travel-times';
  private readonly undoSteps = new Map<string, UndoStep[]>();
  private openTicket = 0;
  private pollTimer: number | undefined;

  constructor(root: HTMLElement) {
    this.root = root;
    this.problems = h('section', { class: 'upload-problems', id: 'upload-problems', hidden: true, 'aria-label': 'Problems found in the file' });
    this.panel = new SurveyPanel({
      open: (id) => void this.openSurvey(id, null, true),
      created: (id, revision) => void this.openSurvey(id, revision, true),
      changed: (survey, deletedId) => void this.surveyChanged(survey, deletedId),
      failed: (error, what) => this.fail(error, what),
    }, this.problems);
    this.travelTimes = new TravelTimeView({
      applyEdits: (edits, description) => this.applyEdits(edits, description, true),
      undo: () => this.undo(),
      undoLabel: () => this.undoStepsOf(this.survey?.id).at(-1)?.description ?? null,
      fileStem: () => this.fileStem(),
    });
    this.depth = new DepthView(() => this.fileStem());
    this.gatherView = new GatherView({
      savePickEdits: (edits, version, description) => this.applyPickEdits(edits, version, description),
      failed: (error, what) => this.fail(error, what),
    });
    this.title = h('div', { class: 'survey-title', id: 'survey-title' });
    this.revisionPicker = h('div', { class: 'revision-picker' });
    this.tabs = h('nav', { class: 'view-tabs', 'aria-label': 'Views' });
    this.actions = h('div', { class: 'top-actions' });
    this.notice = h('div', { class: 'notice', id: 'newer-revision', hidden: true, role: 'status' });
    this.status = h('div', { class: 'status', id: 'status', role: 'status', 'aria-live': 'polite' });
    this.viewHolder = h('div', { class: 'view-holder' });
    this.results = h('section', { class: 'results', id: 'results', 'aria-label': 'Results' });
    this.tokenDialog = this.buildTokenDialog();

    const header = h('header', { class: 'top-bar' },
      h('a', { class: 'brand', href: '/', 'data-nav': 'true' }, h('span', { class: 'brand-mark', 'aria-hidden': 'true' }), 'slopebreak'),
      this.title, this.revisionPicker, this.tabs, this.actions,
    );
    const footer = h('footer', { class: 'caution-strip' },
      h('strong', {}, 'Interpretation, not ground truth. '),
      'Refraction models are non-unique; confirm depths with boreholes; defer to local codes and licensed professionals; seismic sources follow local regulations. ',
      h('a', { href: '#cautions' }, 'All cautions'),
    );
    replaceChildren(root,
      header,
      h('div', { class: 'workspace' }, this.panel.element, h('main', { class: 'main-column', id: 'main' }, this.problems, this.notice, this.status, this.viewHolder, this.results)),
      footer,
      this.tokenDialog,
    );
    root.addEventListener('click', (event) => this.followLink(event));
    window.addEventListener('popstate', () => void this.route(parseRoute(location.pathname), false));
    document.addEventListener('visibilitychange', () => {
      if (document.visibilityState === 'visible') void this.checkNewer();
    });
  }

  async start(): Promise<void> {
    const surveys = await this.panel.refresh();
    const route = parseRoute(location.pathname);
    if (route.surveyId !== null) {
      await this.route(route, false);
      return;
    }
    // First sight: the most recently changed survey, so a newcomer sees a result without a click.
    const latest = mostRecentlyChanged(surveys);
    if (latest) await this.openSurvey(latest.id, null, false);
    else this.renderEmpty();
  }

  private async route(route: Route, push: boolean): Promise<void> {
    if (route.surveyId === null) {
      await this.start();
      return;
    }
    await this.openSurvey(route.surveyId, route.revision, push);
  }

  /** Internal links (data-nav) change the view without reloading the page. */
  private followLink(event: MouseEvent): void {
    const link = (event.target as HTMLElement | null)?.closest('a[data-nav]') as HTMLAnchorElement | null;
    if (!link || event.ctrlKey || event.metaKey || event.shiftKey || event.button !== 0) return;
    event.preventDefault();
    const url = new URL(link.href);
    history.pushState(null, '', url.pathname);
    void this.route(parseRoute(url.pathname), false);
  }

  private renderEmpty(): void {
    this.survey = null;
    this.revision = null;
    replaceChildren(this.title, h('span', { class: 'quiet' }, 'No survey open'));
    replaceChildren(this.revisionPicker);
    replaceChildren(this.tabs);
    replaceChildren(this.actions, this.tokenButton());
    replaceChildren(this.viewHolder, h('div', { class: 'empty-state' },
      h('h2', {}, 'Bring in a pick table to begin'),
      h('p', {}, 'Drop a CSV of first-arrival picks on the panel at the left (columns shot, source_x_m, receiver_x_m, time_ms; see the README for the rest). slopebreak sorts the picks into direct and head-wave branches, fits them, and gives layer velocities and depths with their uncertainties.'),
    ));
    replaceChildren(this.results);
    this.panel.setCurrent(null);
  }

  /**
   * Open a survey at `revisionNumber` (null: the latest). `known`: that revision already in hand
   * (just made by an edit), so it is not fetched again. When two opens overlap, the one asked for
   * last wins: an earlier one that answers later is dropped.
   */
  async openSurvey(id: string, revisionNumber: number | null, push: boolean, known?: Revision): Promise<void> {
    const ticket = ++this.openTicket;
    const stale = () => ticket !== this.openTicket;
    this.say('Loading…');
    try {
      const [survey, revisions, picks, gathers] = await Promise.all([
        api.getSurvey(id),
        api.listRevisions(id),
        // A survey without picks answers 404 here: that is "no picks yet", anything else is an error.
        api.currentPicks(id).catch((error: unknown) => {
          if (error instanceof ServiceError && error.status === 404) return null;
          throw error;
        }),
        // A server without shot gathers answers 404: no gathers.
        api.listGathers(id).catch((error: unknown) => {
          if (error instanceof ServiceError && error.status === 404) return [];
          throw error;
        }),
      ]);
      if (stale()) return;
      let list = revisions;
      if (list.length === 0 && picks !== null) {
        // Picks without an interpretation yet (uploaded by a script): interpret them now.
        await api.interpret(id, survey.version, { scale: survey.scale });
        list = await api.listRevisions(id);
        if (stale()) return;
      }
      const latest = list[list.length - 1];
      if (!latest) {
        this.survey = survey;
        this.revision = null;
        this.picks = picks;
        this.gathers = gathers;
        if (gathers.length > 0) this.view = 'gathers';
        this.renderHeader();
        if (gathers.length > 0) this.renderView();
        else replaceChildren(this.viewHolder, h('div', { class: 'empty-state' }, h('h2', {}, survey.name), h('p', {}, 'This survey has no picks yet.')));
        replaceChildren(this.results);
        this.say('');
        return;
      }
      const number = revisionNumber !== null && list.some((entry) => entry.number === revisionNumber) ? revisionNumber : latest.number;
      const revision = known !== undefined && known.number === number ? known : await api.getRevision(id, number);
      if (stale()) return;
      this.survey = survey;
      this.revisions = list;
      this.revision = revision;
      this.picks = picks;
      this.gathers = gathers;
      const path = paths.revision(id, number);
      // The address bar always holds the revision shown: a URL a colleague can open.
      if (location.pathname !== path) {
        if (push) history.pushState(null, '', path);
        else history.replaceState(null, '', path);
      }
      document.title = `${survey.name}, revision ${number} · slopebreak`;
      this.panel.setCurrent(id);
      this.render();
      if (revisionNumber !== null && number !== revisionNumber) this.say(`Revision ${revisionNumber} does not exist; showing revision ${number}.`);
      else this.say('');
      this.schedulePoll();
    } catch (error) {
      if (stale()) return;
      if (error instanceof ServiceError && error.status === 404) {
        this.say(`That survey is not on this server (it may have been deleted).`, true);
        this.renderEmpty();
        return;
      }
      this.fail(error, 'opening the survey');
    }
  }

  /** The undo steps of a survey (each survey keeps its own while the page is open). */
  private undoStepsOf(id: string | undefined): UndoStep[] {
    if (id === undefined) return [];
    let steps = this.undoSteps.get(id);
    if (!steps) {
      steps = [];
      this.undoSteps.set(id, steps);
    }
    return steps;
  }

  /** True when the revision was computed from the picks stored now (a rename does not change them). */
  private describesCurrentPicks(revision: Revision): boolean {
    const picks = this.picks;
    if (picks === null) return false;
    if (revision.picksState !== null && picks.picksState !== null) return revision.picksState === picks.picksState;
    return revision.surveyVersion === picks.version; // revisions stored before picks states were kept
  }

  private render(): void {
    this.renderHeader();
    this.renderView();
    this.renderResults();
    this.showNewerNotice(this.revisions[this.revisions.length - 1], false);
  }

  /** The notice that a newer revision than the one shown exists (hidden when the latest is shown). */
  private showNewerNotice(latest: RevisionSummary | undefined, sinceOpened: boolean): void {
    const survey = this.survey;
    const shown = this.revision;
    if (!survey || !shown || !latest || latest.number <= shown.number) {
      this.notice.hidden = true;
      return;
    }
    replaceChildren(this.notice,
      `This is revision ${shown.number}. A newer revision of this survey exists: revision ${latest.number} (${shortDateTime(latest.createdAt)})${sinceOpened ? ', made since this page was opened' : ''}. `,
      h('a', { href: paths.revision(survey.id, latest.number), 'data-nav': 'true', id: 'open-newer' }, `Open revision ${latest.number}`),
    );
    this.notice.hidden = false;
  }

  private isLatest(): boolean {
    const latest = this.revisions[this.revisions.length - 1];
    return this.revision !== null && latest !== undefined && latest.number === this.revision.number;
  }

  private renderHeader(): void {
    keepingFocus(this.root, () => this.renderHeaderNow());
  }

  private renderHeaderNow(): void {
    const survey = this.survey;
    if (!survey) return;
    replaceChildren(this.title, h('h1', { title: survey.description || survey.name }, survey.name));
    if (this.revision) {
      const select = h('select', { id: 'revision-select', 'aria-label': 'Revision shown' },
        ...[...this.revisions].reverse().map((entry) => h('option', { value: String(entry.number), selected: entry.number === this.revision!.number },
          `revision ${entry.number}${entry.number === this.revisions[this.revisions.length - 1]?.number ? ' (latest)' : ''} · ${shortDateTime(entry.createdAt)}`)),
      );
      select.addEventListener('change', () => void this.openSurvey(survey.id, Number(select.value), true));
      replaceChildren(this.revisionPicker, select);
    } else replaceChildren(this.revisionPicker);

    const tab = (name: ViewName, label: string) => h('button', {
      type: 'button', class: 'tab', 'aria-pressed': String(this.view === name), 'data-view': name,
      onclick: () => {
        this.view = name;
        this.renderHeader();
        this.renderView();
      },
    }, label);
    if (this.view === 'gathers' && this.gathers.length === 0) this.view = 'travel-times';
    // A survey of gathers with no picks yet has only its gathers to show.
    const interpreted = this.revision !== null || this.gathers.length === 0;
    replaceChildren(this.tabs, interpreted ? tab('travel-times', 'Travel times') : null, interpreted ? tab('depth', 'Depth section') : null,
      this.gathers.length > 0 ? tab('gathers', 'Shot gathers') : null);
    const revision = this.revision;
    replaceChildren(this.actions,
      revision ? h('a', { class: 'button-link', id: 'report-link', href: paths.report(survey.id, revision.number) }, 'Report') : null,
      revision ? h('button', { type: 'button', id: 'copy-link', onclick: () => void this.copyLink() }, 'Copy link') : null,
      this.tokenButton(),
    );
  }

  private tokenButton(): HTMLButtonElement {
    return h('button', { type: 'button', class: 'quiet-button', onclick: () => this.tokenDialog.showModal(), title: 'The access token lets this browser change surveys on a server shared over the network' },
      storedToken() ? 'Token set' : 'Access token');
  }

  private renderView(): void {
    if (this.view === 'gathers' && this.survey && this.gathers.length > 0) {
      replaceChildren(this.viewHolder, this.gatherView.element);
      void this.gatherView.show({
        surveyId: this.survey.id, gathers: this.gathers, timeUnit: this.survey.scale === 'crustal' ? 's' : 'ms',
        picksKey: `${this.picks?.version ?? 0}:${this.picks?.picksState ?? ''}`,
      });
      return;
    }
    const revision = this.revision;
    if (!revision || !this.survey) return;
    const picks = this.picks?.pickSet.picks ?? null;
    const uiRevision = this.survey.id;
    if (this.view === 'travel-times') {
      replaceChildren(this.viewHolder, this.travelTimes.element);
      const latest = this.isLatest();
      const current = this.describesCurrentPicks(revision);
      const latestNumber = this.revisions[this.revisions.length - 1]?.number;
      void this.travelTimes.show(revision.result, picks, latest && current
        ? { editable: true }
        : latest
          ? {
              editable: false,
              reason: 'The picks were changed after this revision was made (a new upload or edits from elsewhere). Interpret them again to see and edit the result.',
              reinterpret: () => this.reinterpret(),
            }
          : {
              editable: false,
              reason: `This is revision ${revision.number}; edits are made on the latest revision${latestNumber ? ` (${latestNumber})` : ''}.`,
              ...(latestNumber ? { latestPath: paths.revision(this.survey.id, latestNumber) } : {}),
            }, uiRevision);
    } else {
      replaceChildren(this.viewHolder, this.depth.element);
      void this.depth.show(revision.result, picks, uiRevision);
    }
  }

  private renderResults(): void {
    const revision = this.revision;
    const survey = this.survey;
    if (!revision || !survey) return;
    const result = revision.result;
    const exports = h('div', { class: 'button-row exports' },
      this.downloadLink(api.layersCsvUrl(survey.id, revision.number), `${this.fileStem()}-layers.csv`, 'Layers CSV', 'The layers of this revision, one row per layer, columns named with their units'),
      this.downloadLink(api.picksCsvUrl(survey.id), `${this.fileStem()}-picks.csv`, 'Picks CSV (with your edits)', 'The current pick table with your branch assignments and exclusions (picks placed by the automatic split have an empty branch)'),
      h('a', { class: 'button-link', href: paths.report(survey.id, revision.number) }, 'Printable report'),
    );
    const summary = h('p', { class: 'result-summary', id: 'result-summary' },
      survey.description ? h('span', { class: 'survey-description' }, `${survey.description}. `) : null,
      `Revision ${revision.number}: ${result.summary.pickCount} picks of ${result.summary.shotCount} shots on ${result.summary.shotSideCount} shot sides; `,
      `${result.summary.layerCount} layers; ${result.summary.excludedPickCount} picks excluded; fits by ${result.options.fitMethod}`,
      result.residuals.overallRms !== null ? `; RMS misfit ${result.residuals.overallRms.toFixed(result.units.time === 'ms' ? 2 : 4)} ${result.units.time}.` : '.',
    );
    replaceChildren(this.results,
      h('div', { class: 'results-head' }, h('h2', {}, 'Results'), exports),
      summary,
      h('div', { class: 'results-grid' },
        h('div', { class: 'results-main' }, layerTable(result)),
        h('div', { class: 'results-side' }, surveyWarnings(result), cautionList(result.cautions)),
      ),
      crustalProfileResults(result, false),
      shotTable(result),
      referenceList(result),
    );
  }

  /**
   * Store `edits`, re-interpret with the shown revision's options, and show the new revision; when
   * `undoable`, remember the edits that take them back. Says how it ended (see storeAndInterpret,
   * also for what a stale version does).
   */
  private async applyEdits(edits: BranchEdit[], description: string, undoable: boolean): Promise<EditOutcome> {
    const survey = this.survey;
    const picks = this.picks;
    const shown = this.revision;
    if (!survey || !picks || !shown) return 'failed';
    const effective = effectiveEdits(picks.pickSet.picks, edits);
    if (effective.length === 0) {
      this.say('Nothing to change: the picks are already where you put them.');
      return 'unchanged';
    }
    const inverse = inverseEdits(picks.pickSet.picks, effective);
    return this.storeAndInterpret(description, shown.options, () => api.addBranchEdits(survey.id, effective, picks.version), () => {
      if (undoable) this.undoStepsOf(survey.id).push({ description, edits: inverse });
    });
  }

  /**
   * Store hand edits of picks made on the shot gathers (a new pick set for the survey), then
   * re-interpret and show the new revision as after a branch edit. The undo steps of branch edits
   * are forgotten: they name picks by their place in the pick set, which the new set renumbers.
   */
  private async applyPickEdits(edits: PickEdit[], version: number, description: string): Promise<EditOutcome> {
    const survey = this.survey;
    if (!survey) return 'failed';
    if (edits.length === 0) return 'unchanged';
    const options = this.revision?.options ?? { scale: survey.scale };
    return this.storeAndInterpret(description, options, () => api.addPickEdits(survey.id, edits, version), () => {
      this.undoStepsOf(survey.id).length = 0;
    });
  }

  /**
   * The way every edit goes: `store` it, call `onStored`, interpret the picks as they are now
   * with `options` and show the new revision. Says how it ended. A stale version (someone else
   * changed the picks) reloads, says so, and forgets this survey's undo steps: they were computed
   * on picks that are no longer there.
   */
  private async storeAndInterpret(description: string, options: Readonly<Record<string, unknown>>, store: () => Promise<{ version: number }>, onStored: () => void): Promise<EditOutcome> {
    const survey = this.survey;
    if (!survey) return 'failed';
    this.say(`Saving the ${description} and interpreting again…`);
    const started = performance.now();
    let stored: { version: number } | null = null;
    try {
      stored = await store();
      onStored();
      const revision = await api.interpret(survey.id, stored.version, options);
      await this.openSurvey(survey.id, revision.number, true, revision);
      this.say(`Saved as revision ${revision.number} (${Math.round(performance.now() - started)} ms).`);
      return 'stored';
    } catch (error) {
      if (error instanceof ServiceError && error.status === 409) {
        this.undoStepsOf(survey.id).length = 0;
        await this.openSurvey(survey.id, null, true);
        this.say('Someone else changed the picks of this survey meanwhile; their latest revision is shown now. Make the edit again if it is still needed.', true);
        return 'conflict';
      }
      if (stored !== null) {
        // The edits are stored but the interpretation failed: show what is there, with the way on.
        await this.openSurvey(survey.id, null, true);
      }
      this.fail(error, stored !== null ? `interpreting after the ${description} (the edit itself is saved)` : `saving the ${description}`);
      return stored !== null ? 'stored' : 'failed';
    }
  }

  /** Interpret the current picks again with the latest revision's options (after changes made elsewhere). */
  private async reinterpret(): Promise<void> {
    const survey = this.survey;
    const picks = this.picks;
    const shown = this.revision;
    if (!survey || !picks || !shown) return;
    try {
      const revision = await api.interpret(survey.id, picks.version, shown.options);
      await this.openSurvey(survey.id, revision.number, true, revision);
      this.say(`Interpreted the current picks as revision ${revision.number}.`);
    } catch (error) {
      this.fail(error, 'interpreting the current picks');
    }
  }

  private async undo(): Promise<void> {
    const steps = this.undoStepsOf(this.survey?.id);
    const step = steps.pop();
    if (!step) return;
    // Not stored (the server refused or did not answer): the step stays, to be tried again.
    if ((await this.applyEdits(step.edits, `undo of the ${step.description}`, false)) === 'failed') steps.push(step);
  }

  private async surveyChanged(survey: Survey | null, deletedId?: string): Promise<void> {
    if (survey) {
      this.survey = survey;
      this.renderHeader();
      return;
    }
    if (deletedId && this.survey?.id === deletedId) {
      history.pushState(null, '', '/');
      await this.panel.refresh();
      // The next survey to show comes from all surveys, not only those the search shows.
      const surveys = await api.listSurveys().catch(() => []);
      const next = mostRecentlyChanged(surveys);
      if (next) await this.openSurvey(next.id, null, true);
      else this.renderEmpty();
    }
  }

  private schedulePoll(): void {
    window.clearInterval(this.pollTimer);
    this.pollTimer = window.setInterval(() => void this.checkNewer(), REVISION_POLL_MS);
  }

  /** Tell the user when a newer revision exists than the one shown (made here or by a colleague). */
  async checkNewer(): Promise<void> {
    const survey = this.survey;
    const revision = this.revision;
    if (!survey || !revision || document.visibilityState === 'hidden') return;
    try {
      const list = await api.listRevisions(survey.id);
      const latest = list[list.length - 1];
      // What is shown now, not when the poll started (an edit may have landed meanwhile).
      const shown = this.revision;
      if (this.survey?.id !== survey.id || !shown) return;
      const madeHere = latest !== undefined && this.revisions.some((entry) => entry.number === latest.number);
      this.showNewerNotice(latest, !madeHere);
    } catch {
      // A missed poll is not worth an error: the next one tries again.
    }
  }

  private async copyLink(): Promise<void> {
    const url = location.origin + (this.survey && this.revision ? paths.revision(this.survey.id, this.revision.number) : '/');
    try {
      await navigator.clipboard.writeText(url);
      this.say(`Link copied: ${url}`);
    } catch {
      this.say(`Link to share: ${url}`);
    }
  }

  /** A download link that fetches through api.ts (with the token when one is kept). */
  private downloadLink(path: string, fileName: string, label: string, title: string): HTMLAnchorElement {
    return h('a', {
      class: 'button-link', href: path, download: fileName, title,
      onclick: (event: Event) => {
        event.preventDefault();
        void downloadFromService(path, fileName).catch((error: unknown) => this.fail(error, `downloading ${label}`));
      },
    }, label);
  }

  private fileStem(): string {
    const name = (this.survey?.name ?? 'survey').replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '') || 'survey';
    return `${name}-rev${this.revision?.number ?? 0}`;
  }

  private say(message: string, important = false): void {
    this.status.classList.toggle('important', important);
    this.status.textContent = message;
  }

  private fail(error: unknown, what: string): void {
    if (error instanceof ServiceError) {
      if (error.needsToken) {
        this.say(`${what}: ${error.message}. Enter the access token the operator gave you.`, true);
        this.tokenDialog.showModal();
        return;
      }
      if (error.status === 409) {
        this.say(`${what} was not done: the survey was changed meanwhile (in another window or by a colleague). The list is up to date now; try again.`, true);
        return;
      }
      this.say(`${what} failed: ${error.message}. ${capitalised(error.fix)}.`, true);
      return;
    }
    this.say(`${what} failed: ${error instanceof Error ? error.message : String(error)}`, true);
  }

  private buildTokenDialog(): HTMLDialogElement {
    const input = h('input', { type: 'password', id: 'token-input', autocomplete: 'off', 'aria-label': 'Access token', size: 40 });
    const dialog = h('dialog', { class: 'token-dialog', 'aria-labelledby': 'token-title' });
    const form = h('form', { method: 'dialog' },
      h('h2', { id: 'token-title' }, 'Access token'),
      h('p', {}, 'On a server shared over the office network, anyone may read surveys, but changes made from other machines need the access token. The operator got it when the service was first started for the network (it is kept in the access-token file of its data folder). The token is kept in this browser only.'),
      input,
      h('div', { class: 'button-row' },
        h('button', { type: 'submit', value: 'save' }, 'Keep token'),
        h('button', { type: 'submit', value: 'clear' }, 'Forget token'),
        h('button', { type: 'submit', value: 'cancel' }, 'Cancel'),
      ),
    );
    dialog.append(form);
    dialog.addEventListener('close', () => {
      if (dialog.returnValue === 'save') storeToken(input.value);
      if (dialog.returnValue === 'clear') storeToken(null);
      input.value = '';
      if (dialog.returnValue === 'save' || dialog.returnValue === 'clear') {
        this.say(dialog.returnValue === 'save' ? 'Token kept; try the change again.' : 'Token forgotten.');
        if (this.survey) this.renderHeader();
        void this.panel.refresh();
      }
    });
    return dialog;
  }
}
