/**
 * SEG-Y files written by segyio (Debian's python3-segyio) with the committed generator
 * `tests/gathers/segy/make-segyio-files.py`, into a temporary folder at test time, and segyio's
 * own reading of them. Tests that use this fail, never skip, when python3-segyio is missing: the
 * cross-check is part of the acceptance criteria.
 */
import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { findPython } from '../../helpers/python.js';

export const GENERATOR = join(dirname(fileURLToPath(import.meta.url)), 'make-segyio-files.py');
/** How the tests name their source in failure messages. */
export const SEGYIO_SOURCE = 'segyio (python3-segyio) via tests/gathers/segy/make-segyio-files.py';

export interface SegyioReading {
  readonly size: number;
  readonly format: number;
  readonly tracecount: number;
  readonly samples: number;
  readonly text: readonly string[];
  readonly extHeaders: number;
  /** Binary header by segyio's BinField byte position (1-based, 3201…). */
  readonly bin: Readonly<Record<string, number>>;
  /** Trace headers by segyio's TraceField byte position (1-based). */
  readonly headers: ReadonlyArray<Readonly<Record<string, number>>>;
  readonly traces: ReadonlyArray<readonly number[]>;
}

export interface SegyioFiles {
  readonly dir: string;
  readonly segyio: string;
  readonly numpy: string;
  readonly files: Readonly<Record<string, SegyioReading>>;
  /** [raw IBM word, segyio's float32 reading]. */
  readonly ibmWords: ReadonlyArray<readonly [number, number]>;
  /** Rev 2 format files: per trace, the values numpy encoded. */
  readonly rev2: Readonly<Record<string, ReadonlyArray<readonly number[]>>>;
  /** Python's cp037 codec: the code point of each byte 0–255. */
  readonly cp037: readonly number[];
  bytes(name: string): Uint8Array;
  remove(): void;
}

export function makeSegyioFiles(): SegyioFiles {
  let python: string;
  try {
    python = findPython(['segyio', 'numpy']);
  } catch (error) {
    throw new Error(
      `SEG-Y reference files need segyio: install Debian's python3-segyio (apt-get install -y python3-segyio) so /usr/bin/python3 can import segyio (${String(error)})`,
    );
  }
  const dir = mkdtempSync(join(tmpdir(), 'slopebreak-segyio-'));
  const output = execFileSync(python, [GENERATOR, dir], { encoding: 'utf8', maxBuffer: 256 * 1024 * 1024 });
  const parsed = JSON.parse(output) as Omit<SegyioFiles, 'dir' | 'bytes' | 'remove'>;
  return {
    ...parsed,
    dir,
    bytes: (name) => new Uint8Array(readFileSync(join(dir, `${name}.sgy`))),
    remove: () => rmSync(dir, { recursive: true, force: true }),
  };
}

/**
 * The segyio files made once per test file on first use, and removed after its tests. Each test
 * that calls `get()` fails on its own (never skips) when python3-segyio is missing, while the
 * file's other tests still run.
 */
export function lazySegyioFiles(afterAll: (cleanup: () => void) => void): () => SegyioFiles {
  let made: SegyioFiles | undefined;
  let failure: Error | undefined;
  afterAll(() => made?.remove());
  return () => {
    if (made !== undefined) return made;
    if (failure !== undefined) throw failure;
    try {
      made = makeSegyioFiles();
      return made;
    } catch (error) {
      failure = error instanceof Error ? error : new Error(String(error));
      throw failure;
    }
  };
}
