/**
 * The workspace: the page a practitioner works in. Survey panel on the left; the open survey's
 * travel-time or depth view; its layer and shot tables, warnings and cautions underneath; a notice
 * when a colleague has made a newer revision; the access-token dialog when the server asks for one.
 *
 * State lives here and only here: the open survey, the revision shown, the stored picks, the undo
 * history of this session's edits. Every change of revision updates the address bar, so the URL
 * in it is always one a colleague can open.
 */
import { api, ServiceError, storeToken, storedToken } from './api.js';
import type { BranchEdit, CurrentPicks, Revision, RevisionSummary, Survey } from './api-types.js';
import { effectiveEdits, inverseEdits } from './branch-editing.js';
import { DepthView } from './depth-view.js';
import { h, replaceChildren } from './dom.js';
import { cautionList, layerTable, referenceList, shotTable, surveyWarnings } from './results-view.js';
import { parseRoute, paths, type Route } from './routes.js';
import { SurveyPanel } from './survey-panel.js';
import { TravelTimeView } from './travel-time-view.js';

/** How often the page asks whether a colleague made a newer revision, ms. */
const REVISION_POLL_MS = 10_000;

type ViewName = 'travel-times' | 'depth';

/** The survey changed last (ISO timestamps sort as text). */
function mostRecentlyChanged(surveys: readonly Survey[]): Survey | undefined {
  return [...surveys].sort((left, right) => right.updatedAt.localeCompare(left.updatedAt))[0];
}

interface UndoStep {
  readonly description: string;
  readonly edits: BranchEdit[];
}

export class Workspace {
  private readonly root: HTMLElement;
  private readonly panel: SurveyPanel;
  private readonly travelTimes: TravelTimeView;
  private readonly depth: DepthView;
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
  private view: ViewName = 'travel-times';
  private undoSteps: UndoStep[] = [];
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
      undoLabel: () => this.undoSteps[this.undoSteps.length - 1]?.description ?? null,
      fileStem: () => this.fileStem(),
    });
    this.depth = new DepthView(() => this.fileStem());
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

  /** Open a survey at `revisionNumber` (null: the latest). */
  async openSurvey(id: string, revisionNumber: number | null, push: boolean): Promise<void> {
    this.say('Loading…');
    try {
      const [survey, revisions, picks] = await Promise.all([api.getSurvey(id), api.listRevisions(id), api.currentPicks(id).catch(() => null)]);
      let list = revisions;
      if (list.length === 0 && picks !== null) {
        // Picks without an interpretation yet (uploaded by a script): interpret them now.
        await api.interpret(id, survey.version);
        list = await api.listRevisions(id);
      }
      const latest = list[list.length - 1];
      if (!latest) {
        this.survey = survey;
        this.revision = null;
        this.renderHeader();
        replaceChildren(this.viewHolder, h('div', { class: 'empty-state' }, h('h2', {}, survey.name), h('p', {}, 'This survey has no picks yet.')));
        replaceChildren(this.results);
        this.say('');
        return;
      }
      const number = revisionNumber !== null && list.some((entry) => entry.number === revisionNumber) ? revisionNumber : latest.number;
      if (revisionNumber !== null && number !== revisionNumber) this.say(`Revision ${revisionNumber} does not exist; showing revision ${number}.`);
      const revision = await api.getRevision(id, number);
      if (this.survey?.id !== id) this.undoSteps = [];
      this.survey = survey;
      this.revisions = list;
      this.revision = revision;
      this.picks = picks;
      const path = paths.revision(id, number);
      // The address bar always holds the revision shown: a URL a colleague can open.
      if (location.pathname !== path) {
        if (push) history.pushState(null, '', path);
        else history.replaceState(null, '', path);
      }
      this.panel.setCurrent(id);
      this.render();
      if (!(revisionNumber !== null && number !== revisionNumber)) this.say('');
      this.schedulePoll();
    } catch (error) {
      if (error instanceof ServiceError && error.status === 404) {
        this.say(`That survey is not on this server (it may have been deleted).`, true);
        this.renderEmpty();
        return;
      }
      this.fail(error, 'opening the survey');
    }
  }

  private render(): void {
    this.renderHeader();
    this.renderView();
    this.renderResults();
    this.notice.hidden = true;
  }

  private isLatest(): boolean {
    const latest = this.revisions[this.revisions.length - 1];
    return this.revision !== null && latest !== undefined && latest.number === this.revision.number;
  }

  private renderHeader(): void {
    const survey = this.survey;
    if (!survey) return;
    replaceChildren(this.title, h('h1', { title: survey.description || survey.name }, survey.name));
    if (this.revision) {
      const select = h('select', { id: 'revision-select', 'aria-label': 'Revision shown' },
        ...[...this.revisions].reverse().map((entry) => h('option', { value: String(entry.number), selected: entry.number === this.revision!.number },
          `revision ${entry.number}${entry.number === this.revisions[this.revisions.length - 1]?.number ? ' (latest)' : ''} · ${new Date(entry.createdAt).toLocaleString(undefined, { dateStyle: 'short', timeStyle: 'short' })}`)),
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
    replaceChildren(this.tabs, tab('travel-times', 'Travel times'), tab('depth', 'Depth section'));
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
    const revision = this.revision;
    if (!revision || !this.survey) return;
    const picks = this.picks?.pickSet.picks ?? null;
    const uiRevision = this.survey.id;
    if (this.view === 'travel-times') {
      replaceChildren(this.viewHolder, this.travelTimes.element);
      const latest = this.isLatest();
      const current = this.picks !== null && revision.surveyVersion === this.picks.version;
      const latestNumber = this.revisions[this.revisions.length - 1]?.number;
      void this.travelTimes.show(revision.result, picks, latest && current
        ? { editable: true }
        : {
            editable: false,
            reason: latest
              ? 'The picks changed after this revision was made; interpret them again to edit.'
              : `This is revision ${revision.number}; edits are made on the latest revision${latestNumber ? ` (${latestNumber})` : ''}.`,
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
      h('a', { class: 'button-link', href: api.layersCsvUrl(survey.id, revision.number), download: '' }, 'Layers CSV'),
      h('a', { class: 'button-link', href: api.picksCsvUrl(survey.id), download: '' }, 'Picks CSV (with branches)'),
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
        h('div', { class: 'results-main' }, layerTable(result), shotTable(result)),
        h('div', { class: 'results-side' }, surveyWarnings(result), cautionList(result.cautions)),
      ),
      referenceList(result),
    );
  }

  /**
   * Store `edits`, re-interpret, and show the new revision; when `undoable`, remember the edits
   * that take them back. A stale version (someone else changed the survey) reloads and says so.
   */
  private async applyEdits(edits: BranchEdit[], description: string, undoable: boolean): Promise<void> {
    const survey = this.survey;
    const picks = this.picks;
    if (!survey || !picks) return;
    const effective = effectiveEdits(picks.pickSet.picks, edits);
    if (effective.length === 0) {
      this.say('Nothing to change: the picks are already where you put them.');
      return;
    }
    const inverse = inverseEdits(picks.pickSet.picks, effective);
    this.say(`Saving the ${description} and interpreting again…`);
    const started = performance.now();
    try {
      const stored = await api.addBranchEdits(survey.id, effective, picks.version);
      const revision = await api.interpret(survey.id, stored.version);
      if (undoable) this.undoSteps.push({ description, edits: inverse });
      await this.openSurvey(survey.id, revision.number, true);
      this.say(`Saved as revision ${revision.number} (${Math.round(performance.now() - started)} ms).`);
    } catch (error) {
      if (error instanceof ServiceError && error.status === 409) {
        await this.openSurvey(survey.id, null, true);
        this.say('Someone else changed this survey meanwhile; their revision is shown now. Make the edit again if it is still needed.', true);
        return;
      }
      this.fail(error, `saving the ${description}`);
    }
  }

  private async undo(): Promise<void> {
    const step = this.undoSteps.pop();
    if (!step) return;
    try {
      await this.applyEdits(step.edits, `undo of the ${step.description}`, false);
    } catch (error) {
      this.undoSteps.push(step);
      throw error;
    }
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
      if (this.survey?.id !== survey.id) return;
      if (latest && latest.number > revision.number) {
        const madeHere = this.revisions.some((entry) => entry.number === latest.number);
        replaceChildren(this.notice,
          `A newer revision of this survey exists: revision ${latest.number} (${new Date(latest.createdAt).toLocaleString()})${madeHere ? '' : ', made since this page was opened'}. `,
          h('a', { href: paths.revision(survey.id, latest.number), 'data-nav': 'true', id: 'open-newer' }, `Open revision ${latest.number}`),
        );
        this.notice.hidden = false;
      } else this.notice.hidden = true;
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
      this.say(`${what} failed: ${error.message}. ${error.fix}.`, true);
      return;
    }
    this.say(`${what} failed: ${error instanceof Error ? error.message : String(error)}`, true);
  }

  private buildTokenDialog(): HTMLDialogElement {
    const input = h('input', { type: 'password', id: 'token-input', autocomplete: 'off', 'aria-label': 'Access token', size: 40 });
    const dialog = h('dialog', { class: 'token-dialog', 'aria-labelledby': 'token-title' });
    const form = h('form', { method: 'dialog' },
      h('h2', { id: 'token-title' }, 'Access token'),
      h('p', {}, 'A server shared over the office network lets anyone read surveys, but changes from other machines need the access token its operator printed when it first started. It is kept in this browser only.'),
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
