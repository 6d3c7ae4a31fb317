/**
 * Durability test (issue 3 acceptance): the built command line (`slopebreak serve`, from
 * `npm run build`) runs as a child process over a temporary data folder on 127.0.0.1; a burst of
 * writes goes to it on several surveys at once, and the child is killed with SIGKILL in the middle
 * of the burst, while requests are in flight. The database file is then opened directly: it must
 * pass SQLite's integrity check, hold every write that was acknowledged with a 2xx, hold nothing of
 * any write that was refused, and hold each unanswered write either whole or not at all. Finally
 * the server is started again over the same folder and must serve and accept writes.
 */
import type { ChildProcess } from 'node:child_process';
import { createHash } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { isDeepStrictEqual } from 'node:util';
import { afterEach, describe, expect, it } from 'vitest';
import { DATABASE_FILE_NAME } from '../../server/app.js';
import { openDatabase } from '../../server/storage/database.js';
import { SMALL_PICK_TABLE } from './api-harness.js';
import { startServeChild } from '../helpers/serve-child.js';
import { errorOf, LOOPBACK_HOST, sendOverLoopback, type LoopbackReply } from './loopback-http.js';

/** Surveys written at once: each gets its own chain of writes, so several requests are in flight at the kill. */
const SURVEY_COUNT = 4;
/** Planned writes per survey: 4 × 50 = 200 in the burst, far more than happen before the kill. */
const STEPS_PER_SURVEY = 50;
/** The child is killed once this many writes of the burst have been acknowledged. */
const KILL_AFTER_ACKNOWLEDGED = 60;
/** Every this-many steps a chain also sends a write that must be refused (stale version or a bad edit). */
const REFUSED_EVERY = 5;
/** How long the child may take to start and print its URL (a cold Node start plus migrations). */
const START_TIMEOUT_MS = 15_000;
/** Per request, and for the child to exit after a signal. */
const REQUEST_TIMEOUT_MS = 10_000;
/** The whole burst; it normally reaches the kill in well under a second. */
const BURST_TIMEOUT_MS = 20_000;
/** SMALL_PICK_TABLE has three picks. */
const PICK_COUNT = 3;

type WriteKind = 'rename' | 'branch-edits' | 'upload' | 'interpretation';
/** The kinds in turn; renames, edits and uploads raise the survey version, interpretations add a revision. */
const KIND_CYCLE: readonly WriteKind[] = ['rename', 'branch-edits', 'upload', 'interpretation'];

interface WriteRecord {
  readonly surveyId: string;
  readonly step: number;
  readonly kind: WriteKind;
  /** The version the write was made against. */
  readonly sentVersion: number;
  /** A write made to be refused (stale version or an edit of a pick that does not exist). */
  readonly meantToFail: boolean;
  /** What identifies it in the database: the new name, the upload's SHA-256, the edit list as JSON, the options as JSON. */
  readonly marker: string;
  outcome: 'pending' | 'acknowledged' | 'refused' | 'unanswered';
  status?: number;
  reply?: unknown;
  errorCode?: string;
}

interface RunningChild {
  readonly child: ChildProcess;
  readonly port: number;
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** What the child wrote on stderr, for failure messages. */
  readonly stderr: () => string;
}

const children: ChildProcess[] = [];
const folders: string[] = [];
afterEach(() => {
  for (const child of children.splice(0)) if (child.exitCode === null && child.signalCode === null) child.kill('SIGKILL');
  for (const folder of folders.splice(0)) rmSync(folder, { recursive: true, force: true });
});

function withTimeout<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not happen within ${ms} ms`)), ms);
  });
  return Promise.race([promise, timeout]).finally(() => clearTimeout(timer));
}

/** Starts `slopebreak serve` on a free loopback port over `dataDir` and waits for the URL it prints. */
async function startChild(dataDir: string): Promise<RunningChild> {
  const started = await startServeChild(['--host', LOOPBACK_HOST, '--port', '0', '--data', dataDir], START_TIMEOUT_MS);
  children.push(started.child);
  return { child: started.child, port: started.port, exited: started.exited, stderr: started.output };
}

/** The upload of step `step` of survey `surveyIndex`: the same three picks, a comment line making the bytes unique. */
function pickTableFor(surveyIndex: number, step: number): Buffer {
  return Buffer.from(`# survey ${surveyIndex}, burst step ${step}\n${SMALL_PICK_TABLE}`, 'utf8');
}

/** Two JSON texts of the same value (key order aside). */
function sameJson(stored: string, sent: string): boolean {
  return isDeepStrictEqual(JSON.parse(stored), JSON.parse(sent));
}

function sha256(bytes: Buffer): string {
  return createHash('sha256').update(bytes).digest('hex');
}

describe('slopebreak serve killed with SIGKILL in a burst of writes', () => {
  it('when the server process is killed mid-burst, then on restart the database is intact, every acknowledged write is there and no refused or unanswered write is half there', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-durability-'));
    folders.push(dataDir);
    const first = await startChild(dataDir);
    const send = (call: Parameters<typeof sendOverLoopback>[1]) => sendOverLoopback(first.port, call);

    // Set-up (not part of the burst): surveys, each with a pick table so branch edits and interpretations apply.
    const surveys: { id: string; index: number; setupVersion: number; setupSha: string }[] = [];
    for (let index = 0; index < SURVEY_COUNT; index += 1) {
      const created = await send({ method: 'POST', path: '/api/surveys', json: { name: `Burst survey ${index}` }, timeoutMs: REQUEST_TIMEOUT_MS });
      expect(created.status, created.text).toBe(201);
      const id = (created.json as { id: string }).id;
      const bytes = pickTableFor(index, -1);
      const uploaded = await send({ method: 'POST', path: `/api/surveys/${id}/picks`, headers: { 'if-match': '"v1"', 'content-type': 'text/csv' }, body: bytes, timeoutMs: REQUEST_TIMEOUT_MS });
      expect(uploaded.status, uploaded.text).toBe(201);
      surveys.push({ id, index, setupVersion: (uploaded.json as { version: number }).version, setupSha: sha256(bytes) });
    }

    // The burst. `sentUnanswered` holds requests fully handed to the server and not yet answered.
    const records: WriteRecord[] = [];
    const sentUnanswered = new Set<WriteRecord>();
    let acknowledged = 0;
    let killArmed = false;
    let killed = false;
    let inFlightAtKill = 0;
    const killIfDue = () => {
      if (!killArmed || killed || sentUnanswered.size === 0) return;
      killed = true;
      inFlightAtKill = sentUnanswered.size;
      first.child.kill('SIGKILL');
    };

    const issue = async (record: WriteRecord, call: Omit<Parameters<typeof sendOverLoopback>[1], 'timeoutMs' | 'onSent'>): Promise<LoopbackReply | undefined> => {
      records.push(record);
      try {
        const reply = await send({ ...call, timeoutMs: REQUEST_TIMEOUT_MS, onSent: () => { sentUnanswered.add(record); killIfDue(); } });
        sentUnanswered.delete(record);
        record.status = reply.status;
        record.reply = reply.json;
        record.outcome = reply.status >= 200 && reply.status < 300 ? 'acknowledged' : 'refused';
        if (record.outcome === 'acknowledged' && !record.meantToFail) {
          acknowledged += 1;
          if (acknowledged >= KILL_AFTER_ACKNOWLEDGED) killArmed = true;
          killIfDue();
        }
        return reply;
      } catch (error) {
        sentUnanswered.delete(record);
        record.outcome = 'unanswered';
        record.errorCode = (error as NodeJS.ErrnoException).code ?? String(error);
        return undefined;
      }
    };

    const runChain = async (survey: (typeof surveys)[number]): Promise<void> => {
      let version = survey.setupVersion;
      for (let step = 0; step < STEPS_PER_SURVEY; step += 1) {
        if (step % REFUSED_EVERY === REFUSED_EVERY - 1) {
          // A write that must leave nothing behind: alternately a stale-version upload (409) and an edit of a pick that does not exist (422).
          const staleUpload = step % (2 * REFUSED_EVERY) === REFUSED_EVERY - 1;
          const bytes = pickTableFor(survey.index, 1000 + step);
          const edits = [{ pickIndex: PICK_COUNT, assign: 1000 + step }];
          const record: WriteRecord = {
            surveyId: survey.id, step, kind: staleUpload ? 'upload' : 'branch-edits', sentVersion: staleUpload ? version - 1 : version,
            meantToFail: true, marker: staleUpload ? sha256(bytes) : JSON.stringify(edits), outcome: 'pending',
          };
          const reply = staleUpload
            ? await issue(record, { method: 'POST', path: `/api/surveys/${survey.id}/picks`, headers: { 'if-match': `"v${record.sentVersion}"`, 'content-type': 'text/csv' }, body: bytes })
            : await issue(record, { method: 'POST', path: `/api/surveys/${survey.id}/branch-edits`, headers: { 'if-match': `"v${version}"` }, json: { edits } });
          if (reply === undefined) return;
        }
        const kind = KIND_CYCLE[step % KIND_CYCLE.length]!;
        const ifMatch = { 'if-match': `"v${version}"` };
        const base = { surveyId: survey.id, step, kind, sentVersion: version, meantToFail: false, outcome: 'pending' as const };
        let reply: LoopbackReply | undefined;
        if (kind === 'rename') {
          const name = `Burst survey ${survey.index}, step ${step}`;
          reply = await issue({ ...base, marker: name }, { method: 'PATCH', path: `/api/surveys/${survey.id}`, headers: ifMatch, json: { name } });
        } else if (kind === 'branch-edits') {
          const edits = [{ pickIndex: step % PICK_COUNT, assign: step + 1 }];
          reply = await issue({ ...base, marker: JSON.stringify(edits) }, { method: 'POST', path: `/api/surveys/${survey.id}/branch-edits`, headers: ifMatch, json: { edits } });
        } else if (kind === 'upload') {
          const bytes = pickTableFor(survey.index, step);
          reply = await issue({ ...base, marker: sha256(bytes) }, { method: 'POST', path: `/api/surveys/${survey.id}/picks`, headers: { ...ifMatch, 'content-type': 'text/csv' }, body: bytes });
        } else {
          const options = { seed: step, scale: 'engineering' }; // the scale given, so the stored options are exactly these
          reply = await issue({ ...base, marker: JSON.stringify(options) }, { method: 'POST', path: `/api/surveys/${survey.id}/interpretations`, headers: ifMatch, json: options });
        }
        if (reply === undefined || reply.status >= 300) return; // the server is gone, or something unexpected: the checks below say which
        if (kind !== 'interpretation') version = (reply.json as { version: number }).version;
      }
    };

    await withTimeout(Promise.all(surveys.map(runChain)), BURST_TIMEOUT_MS, 'the burst ending');
    const exit = await withTimeout(first.exited, REQUEST_TIMEOUT_MS, 'the killed server exiting');
    expect(killed, `the burst ended before ${KILL_AFTER_ACKNOWLEDGED} acknowledged writes (stderr: ${first.stderr()})`).toBe(true);
    expect(exit.signal).toBe('SIGKILL');
    expect(inFlightAtKill, 'requests in the server\'s hands at the kill').toBeGreaterThan(0);
    const unexpected = records.filter((record) => record.outcome === 'refused' && !record.meantToFail);
    expect(unexpected.map((record) => `${record.kind} ${record.status} ${JSON.stringify(record.reply)}`), 'writes with the right version are refused only by the kill').toEqual([]);
    const wronglyAccepted = records.filter((record) => record.meantToFail && record.outcome === 'acknowledged');
    expect(wronglyAccepted.map((record) => `${record.kind} step ${record.step}`), 'stale or invalid writes are refused').toEqual([]);
    for (const record of records.filter((entry) => entry.meantToFail && entry.outcome === 'refused')) {
      expect(errorOf({ status: record.status!, headers: {}, json: record.reply, text: '' })?.code).toBe(record.kind === 'upload' ? 'version-stale' : 'branch-edits-refused');
    }

    // Restart part 1: open the file directly, as the next start of the server would.
    const db = openDatabase(join(dataDir, DATABASE_FILE_NAME));
    let presentUnanswered = 0;
    try {
      expect(db.pragma('integrity_check', { simple: true })).toBe('ok');
      expect(db.pragma('foreign_key_check')).toEqual([]);
      // No pick set without its upload, no upload without exactly one pick set.
      expect(db.prepare('SELECT count(*) FROM pick_sets WHERE upload_id IS NULL OR upload_id NOT IN (SELECT id FROM uploads)').pluck().get()).toBe(0);
      expect(db.prepare('SELECT count(*) FROM uploads WHERE (SELECT count(*) FROM pick_sets WHERE upload_id = uploads.id) <> 1').pluck().get()).toBe(0);

      for (const survey of surveys) {
        const mine = records.filter((record) => record.surveyId === survey.id);
        const real = mine.filter((record) => !record.meantToFail);
        const row = db.prepare<[string], { name: string; version: number }>('SELECT name, version FROM surveys WHERE id = ?').get(survey.id);
        expect(row, `survey ${survey.index} is in the database`).toBeDefined();
        const uploads = db.prepare<[string], { id: string; sha256: string; bytes: Buffer; pickSetJson: string }>(
          'SELECT u.id, u.sha256, u.bytes, p.pick_set_json AS pickSetJson FROM uploads u JOIN pick_sets p ON p.upload_id = u.id WHERE u.survey_id = ? ORDER BY p.id',
        ).all(survey.id);
        const edits = db.prepare<[string], { sequence: number; editsJson: string }>('SELECT sequence, edits_json AS editsJson FROM branch_edits WHERE survey_id = ? ORDER BY sequence').all(survey.id);
        const revisions = db.prepare<[string], { number: number; optionsJson: string; surveyVersion: number }>(
          'SELECT number, options_json AS optionsJson, survey_version AS surveyVersion FROM revisions WHERE survey_id = ? ORDER BY number',
        ).all(survey.id);

        // An unanswered write is either whole in the database or absent; find out which, from its own trace.
        const isPresent = (record: WriteRecord): boolean => {
          if (record.kind === 'upload') return uploads.some((upload) => upload.sha256 === record.marker);
          if (record.kind === 'branch-edits') return edits.some((edit) => sameJson(edit.editsJson, record.marker));
          if (record.kind === 'interpretation') return revisions.some((revision) => sameJson(revision.optionsJson, record.marker));
          return row!.version === record.sentVersion + 1 && row!.name === record.marker;
        };
        const unanswered = real.filter((record) => record.outcome === 'unanswered');
        expect(unanswered.length, 'a chain stops at its first unanswered write').toBeLessThanOrEqual(1);
        const applied = real.filter((record) => record.outcome === 'acknowledged' || (record.outcome === 'unanswered' && isPresent(record)));
        presentUnanswered += applied.length - real.filter((record) => record.outcome === 'acknowledged').length;

        // Versions: one step per applied version-raising write, none skipped, none counted twice.
        const raising = applied.filter((record) => record.kind !== 'interpretation');
        expect(raising.map((record) => record.sentVersion), `survey ${survey.index}: consecutive versions`).toEqual(raising.map((_, offset) => survey.setupVersion + offset));
        expect(row!.version).toBe(survey.setupVersion + raising.length);
        const lastAcknowledged = Math.max(survey.setupVersion, ...real.filter((record) => record.outcome === 'acknowledged').map((record) => (record.reply as { version?: number }).version ?? 0));
        expect(row!.version).toBeGreaterThanOrEqual(lastAcknowledged);
        expect(row!.name).toBe(applied.filter((record) => record.kind === 'rename').at(-1)?.marker ?? `Burst survey ${survey.index}`);

        // Uploads: exactly the set-up one and the applied ones, in order, byte for byte, each with its pick set.
        const appliedUploads = applied.filter((record) => record.kind === 'upload');
        expect(uploads.map((upload) => upload.sha256)).toEqual([survey.setupSha, ...appliedUploads.map((record) => record.marker)]);
        for (const upload of uploads) {
          expect(sha256(upload.bytes)).toBe(upload.sha256);
          expect((JSON.parse(upload.pickSetJson) as { picks: unknown[] }).picks).toHaveLength(PICK_COUNT);
        }
        for (const record of appliedUploads.filter((entry) => entry.outcome === 'acknowledged')) {
          expect(uploads.find((upload) => upload.sha256 === record.marker)?.id).toBe((record.reply as { upload: { id: string } }).upload.id);
        }

        // Branch edits: sequence 1, 2, 3… with exactly the applied edit lists; acknowledged ones at the sequence they were told.
        const appliedEdits = applied.filter((record) => record.kind === 'branch-edits');
        expect(edits.map((edit) => edit.sequence)).toEqual(appliedEdits.map((_, offset) => offset + 1));
        expect(edits.map((edit) => JSON.parse(edit.editsJson) as unknown)).toEqual(appliedEdits.map((record) => JSON.parse(record.marker) as unknown));
        appliedEdits.forEach((record, offset) => {
          if (record.outcome === 'acknowledged') expect((record.reply as { sequence: number }).sequence).toBe(offset + 1);
        });

        // Revisions: numbered 1, 2, 3… with the options and survey version each acknowledgement reported.
        const appliedRevisions = applied.filter((record) => record.kind === 'interpretation');
        expect(revisions.map((revision) => revision.number)).toEqual(appliedRevisions.map((_, offset) => offset + 1));
        expect(revisions.map((revision) => JSON.parse(revision.optionsJson) as unknown)).toEqual(appliedRevisions.map((record) => JSON.parse(record.marker) as unknown));
        appliedRevisions.forEach((record, offset) => {
          expect(revisions[offset]!.surveyVersion).toBe(record.sentVersion);
          if (record.outcome === 'acknowledged') expect((record.reply as { number: number }).number).toBe(offset + 1);
        });

        // Refused writes left nothing: not their upload, not their edit list.
        for (const record of mine.filter((entry) => entry.meantToFail)) expect(isPresent(record), `refused ${record.kind} at step ${record.step}`).toBe(false);
      }
    } finally {
      db.close();
    }

    // Restart part 2: the server starts again over the same folder, serves what is stored and takes a write.
    const second = await startChild(dataDir);
    const survey = surveys[0]!;
    const stored = await sendOverLoopback(second.port, { method: 'GET', path: `/api/surveys/${survey.id}`, timeoutMs: REQUEST_TIMEOUT_MS });
    expect(stored.status).toBe(200);
    const { version } = stored.json as { version: number };
    const picks = await sendOverLoopback(second.port, { method: 'GET', path: `/api/surveys/${survey.id}/picks`, timeoutMs: REQUEST_TIMEOUT_MS });
    expect(picks.status, picks.text).toBe(200);
    const renamed = await sendOverLoopback(second.port, {
      method: 'PATCH', path: `/api/surveys/${survey.id}`, headers: { 'if-match': `"v${version}"` }, json: { name: 'After the restart' }, timeoutMs: REQUEST_TIMEOUT_MS,
    });
    expect(renamed.json).toMatchObject({ name: 'After the restart', version: version + 1 });
    second.child.kill('SIGTERM');
    expect(await withTimeout(second.exited, REQUEST_TIMEOUT_MS, 'the restarted server stopping on SIGTERM')).toEqual({ code: 0, signal: null });

    const answered = records.filter((record) => !record.meantToFail && record.outcome === 'acknowledged').length;
    const unansweredCount = records.filter((record) => record.outcome === 'unanswered').length;
    console.info(
      `durability: ${answered} writes acknowledged, ${inFlightAtKill} sent and unanswered at the kill, ${unansweredCount} unanswered in all ` +
        `(${presentUnanswered} of them found whole in the database, the rest absent), ${records.filter((record) => record.meantToFail).length} refused as intended`,
    );
  });
});
