/**
 * The survey panel: the list of surveys on this server (search by name, open, rename, delete) and
 * the place to bring in a new pick table (drop it, or choose it), with upload progress and, when
 * the reader refuses the file, every problem it found listed by line.
 *
 * A refused table leaves nothing behind: the survey created for it is deleted again.
 */
import { api, ServiceError, uploadPicks } from './api.js';
import type { Survey, TableProblem } from './api-types.js';
import { h, replaceChildren } from './dom.js';
import { shortDateTime } from './format.js';

export interface SurveyPanelHooks {
  /** Open a survey (its latest revision). */
  readonly open: (id: string) => void;
  /** A new survey was uploaded and interpreted. */
  readonly created: (id: string, revision: number) => void;
  /** The open survey was renamed or deleted. */
  readonly changed: (survey: Survey | null, deletedId?: string) => void;
  /** Report an error from a request (the token dialog is offered when it needs one). */
  readonly failed: (error: unknown, what: string) => void;
}

/** File names become survey names: without the extension, at most 200 characters. */
export function surveyNameFromFile(fileName: string): string {
  const stem = fileName.replace(/\.[^.]+$/, '').trim();
  return (stem || 'survey').slice(0, 200);
}

export class SurveyPanel {
  readonly element: HTMLElement;
  private readonly list: HTMLUListElement;
  private readonly search: HTMLInputElement;
  private readonly uploadState: HTMLDivElement;
  private readonly fileInput: HTMLInputElement;
  private surveys: Survey[] = [];
  private currentId: string | null = null;
  private searchTimer: number | undefined;

  /**
   * `problemsHost`: where a refused file's problems are listed — the wide main column, since a
   * table of line, column, problem and fix does not fit the narrow panel.
   */
  constructor(private readonly hooks: SurveyPanelHooks, private readonly problemsHost: HTMLElement) {
    this.search = h('input', {
      type: 'search', id: 'survey-search', placeholder: 'Find by name', 'aria-label': 'Find surveys by name', autocomplete: 'off',
      oninput: () => {
        window.clearTimeout(this.searchTimer);
        this.searchTimer = window.setTimeout(() => void this.refresh(), 150);
      },
    });
    this.list = h('ul', { class: 'survey-list', 'aria-label': 'Surveys' });
    this.fileInput = h('input', {
      // Several files at once for shot gathers (one SEG-2 file per shot is common); the server tells them apart by content.
      type: 'file', id: 'pick-file', multiple: true, accept: '.csv,.txt,.tsv,.dat,.sg2,.seg2,.sgy,.segy,text/csv,text/plain', class: 'visually-hidden',
      onchange: () => {
        const files = [...(this.fileInput.files ?? [])];
        if (files.length > 0) void this.upload(files);
        this.fileInput.value = '';
      },
    });
    // The file input sits inside its label, so the label shows the keyboard focus (:focus-within).
    const dropZone = h('label', { class: 'drop-zone', id: 'drop-zone' },
      this.fileInput,
      h('span', { class: 'drop-title' }, 'New survey from a pick table or shot gathers'),
      h('span', { class: 'drop-hint' }, 'Drop a CSV, or SEG-2 or SEG-Y files, here, or press to choose'),
    );
    dropZone.addEventListener('dragover', (event) => {
      event.preventDefault();
      dropZone.classList.add('dragging');
    });
    dropZone.addEventListener('dragleave', () => dropZone.classList.remove('dragging'));
    dropZone.addEventListener('drop', (event) => {
      event.preventDefault();
      dropZone.classList.remove('dragging');
      const files = [...(event.dataTransfer?.files ?? [])];
      if (files.length > 0) void this.upload(files);
    });
    this.uploadState = h('div', { class: 'upload-state', id: 'upload-state', 'aria-live': 'polite' });
    this.element = h('aside', { class: 'survey-panel', 'aria-label': 'Surveys on this server' },
      h('h2', {}, 'Surveys'),
      this.search,
      this.list,
      dropZone,
      this.uploadState,
    );
  }

  setCurrent(id: string | null): void {
    this.currentId = id;
    this.render();
  }

  async refresh(): Promise<Survey[]> {
    try {
      this.surveys = await api.listSurveys(this.search.value.trim());
    } catch (error) {
      this.hooks.failed(error, 'listing the surveys');
    }
    this.render();
    return this.surveys;
  }

  private render(): void {
    if (this.surveys.length === 0) {
      replaceChildren(this.list, h('li', { class: 'quiet' }, this.search.value ? 'No survey has that in its name.' : 'No surveys yet: bring in a pick table below.'));
      return;
    }
    replaceChildren(this.list, ...this.surveys.map((survey) => this.item(survey)));
  }

  private item(survey: Survey): HTMLLIElement {
    const current = survey.id === this.currentId;
    const open = h('button', { class: 'survey-open', type: 'button', 'aria-current': current ? 'true' : false, onclick: () => {
      this.clearProblems();
      replaceChildren(this.uploadState);
      this.hooks.open(survey.id);
    } },
      h('span', { class: 'survey-name' }, survey.name),
      h('span', { class: 'survey-meta' }, `${survey.scale === 'crustal' ? 'crustal' : 'engineering'} · ${shortDateTime(survey.updatedAt)}`),
    );
    const rename = h('button', { class: 'icon-button', type: 'button', title: `Rename ${survey.name}`, 'aria-label': `Rename ${survey.name}`, onclick: () => this.startRename(item, survey) }, 'Rename');
    const remove = h('button', { class: 'icon-button danger', type: 'button', title: `Delete ${survey.name}`, 'aria-label': `Delete ${survey.name}`, onclick: () => void this.remove(survey) }, 'Delete');
    const item = h('li', { class: current ? 'current' : '', 'data-survey-id': survey.id }, open, h('span', { class: 'survey-actions' }, rename, remove));
    return item;
  }

  private startRename(item: HTMLLIElement, survey: Survey): void {
    const input = h('input', { type: 'text', value: survey.name, 'aria-label': `New name for ${survey.name}`, maxlength: 200 });
    const form = h('form', { class: 'rename-form' }, input,
      h('button', { type: 'submit' }, 'Save'),
      h('button', { type: 'button', onclick: () => this.render() }, 'Cancel'),
    );
    form.addEventListener('submit', (event) => {
      event.preventDefault();
      void (async () => {
        try {
          // The list may be older than the survey (an edit since): rename the survey as it is now.
          const fresh = await api.getSurvey(survey.id);
          const renamed = await api.updateSurvey(survey.id, { name: input.value }, fresh.version);
          await this.refresh();
          if (renamed.id === this.currentId) this.hooks.changed(renamed);
        } catch (error) {
          this.hooks.failed(error, `renaming ${survey.name}`);
          await this.refresh();
        }
      })();
    });
    input.addEventListener('keydown', (event) => {
      if (event.key === 'Escape') this.render();
    });
    replaceChildren(item, form);
    input.focus();
    input.select();
  }

  private async remove(survey: Survey): Promise<void> {
    if (!window.confirm(`Delete the survey “${survey.name}” with its picks, edits and every revision? This cannot be undone.`)) return;
    try {
      const fresh = await api.getSurvey(survey.id);
      await api.deleteSurvey(survey.id, fresh.version);
      await this.refresh();
      if (survey.id === this.currentId) this.hooks.changed(null, survey.id);
    } catch (error) {
      this.hooks.failed(error, `deleting ${survey.name}`);
    }
  }

  private showProblems(fileName: string, problems: readonly TableProblem[], heading: string): void {
    replaceChildren(this.problemsHost,
      h('div', { class: 'problems-head' },
        h('h2', {}, heading),
        h('button', { type: 'button', onclick: () => this.clearProblems(), 'aria-label': `Close the list of problems in ${fileName}` }, 'Close')),
      problemTable(problems, `${fileName}: line by line`),
    );
    this.problemsHost.hidden = false;
  }

  private clearProblems(): void {
    replaceChildren(this.problemsHost);
    this.problemsHost.hidden = true;
  }

  /**
   * Create a survey from `files` (a pick table, or shot-gather files sent together), upload them
   * with progress, interpret them; on refusal list the problems and delete the survey. The survey
   * is named after the first file.
   */
  async upload(files: File | readonly File[]): Promise<void> {
    const all = files instanceof File ? [files] : [...files];
    const first = all[0];
    if (!first) return;
    // What the messages below call the upload: the file, or the first file and how many more.
    const file = all.length === 1 ? first : { name: `${first.name} and ${all.length - 1} more file${all.length === 2 ? '' : 's'}` };
    const progress = h('progress', { max: 1, value: 0, 'aria-label': `Uploading ${file.name}` });
    replaceChildren(this.uploadState, h('p', {}, `Uploading ${file.name}…`), progress);
    let survey: Survey | null = null;
    try {
      survey = await api.createSurvey(surveyNameFromFile(first.name));
      const reply = await uploadPicks(survey.id, all, survey.version, (fraction) => {
        progress.value = fraction;
      });
      replaceChildren(this.uploadState, h('p', {}, `Read ${reply.pickCount} picks of ${reply.shotIds.length} shots; interpreting…`));
      // A crustal table (km, s) gets a crustal survey, so that every later revision keeps its units.
      const version = reply.suggestedScale === survey.scale ? reply.version : (await api.updateSurvey(survey.id, { scale: reply.suggestedScale }, reply.version)).version;
      const revision = await api.interpret(survey.id, version, { scale: reply.suggestedScale });
      replaceChildren(this.uploadState,
        h('p', { class: 'upload-done' }, `${file.name}: ${reply.pickCount} picks, ${reply.shotIds.length} shots, interpreted as revision ${revision.number}.`),
      );
      if (reply.warnings.length > 0) this.showProblems(file.name, reply.warnings, `${file.name} was loaded; the reader noted:`);
      else this.clearProblems();
      await this.refresh();
      this.hooks.created(survey.id, revision.number);
    } catch (error) {
      if (survey !== null) {
        // Nothing half-saved: the empty survey made for a refused file goes again.
        await api.getSurvey(survey.id).then((stale) => api.deleteSurvey(stale.id, stale.version)).catch(() => undefined);
      }
      if (error instanceof ServiceError && error.problems.length > 0) {
        const count = `${error.problems.length} problem${error.problems.length === 1 ? '' : 's'}`;
        replaceChildren(this.uploadState,
          h('p', { class: 'upload-refused', role: 'alert' }, `${file.name} was not loaded: ${count}, listed beside. Nothing was stored.`));
        this.showProblems(file.name, error.problems, `${file.name} was not loaded: ${count}. Nothing was stored; correct the file and bring it in again.`);
      } else {
        replaceChildren(this.uploadState, h('p', { class: 'upload-refused', role: 'alert' },
          `${file.name} was not loaded: ${error instanceof Error ? error.message : String(error)}.`,
          error instanceof ServiceError ? ` ${error.fix}.` : ''));
        this.hooks.failed(error, `uploading ${file.name}`);
      }
      await this.refresh();
    }
  }
}

/** The reader's problems as a table: line, column, what is wrong, how to fix it. */
export function problemTable(problems: readonly TableProblem[], caption: string): HTMLTableElement {
  return h('table', { class: 'problem-table' },
    h('caption', {}, caption),
    h('thead', {}, h('tr', {}, h('th', { scope: 'col' }, 'Line'), h('th', { scope: 'col' }, 'Column'), h('th', { scope: 'col' }, 'Problem'), h('th', { scope: 'col' }, 'Fix'))),
    h('tbody', {}, ...problems.map((problem) => h('tr', { class: `severity-${problem.severity}` },
      h('td', { class: 'number' }, String(problem.line)),
      h('td', {}, problem.field ?? (problem.column === null ? '' : String(problem.column))),
      h('td', {}, problem.message),
      h('td', {}, problem.fix),
    ))),
  );
}
