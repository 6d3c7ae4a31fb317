/**
 * Runs a reference computation in Python (numpy/scipy from Debian's python3-numpy and
 * python3-scipy, which `.ci/run` installs) and returns its JSON output. Tests that call this fail,
 * never skip, when no interpreter with the needed modules is found: the cross-check is part of the
 * acceptance criteria.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';

const CANDIDATES = ['/usr/bin/python3', 'python3'];

export function findPython(modules: readonly string[]): string {
  const probe = `import ${modules.join(', ')}`;
  for (const candidate of CANDIDATES) {
    if (candidate.startsWith('/') && !existsSync(candidate)) continue;
    try {
      execFileSync(candidate, ['-c', probe], { stdio: 'ignore' });
      return candidate;
    } catch {
      // try the next interpreter
    }
  }
  throw new Error(
    `no python3 with ${modules.join(', ')} found (tried ${CANDIDATES.join(', ')}); ` +
      'install Debian packages python3-numpy python3-scipy (.ci/run does)',
  );
}

/** Run `script` with `input` as JSON on stdin; the script prints one JSON document. */
export function runPythonJson<T>(script: string, input: unknown, modules: readonly string[] = ['numpy', 'scipy']): T {
  const python = findPython(modules);
  const output = execFileSync(python, ['-c', script], {
    input: JSON.stringify(input),
    maxBuffer: 512 * 1024 * 1024,
    encoding: 'utf8',
  });
  return JSON.parse(output) as T;
}
