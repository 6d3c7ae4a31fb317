/**
 * `slopebreak serve` from the built bin (dist/server/cli.js, built by `npm test` before vitest)
 * as a child process on a loopback port, started and waited for in bounded time. Shared by the CLI
 * tests and the durability test.
 */
import { spawn, type ChildProcess } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

export const CLI = fileURLToPath(new URL('../../dist/server/cli.js', import.meta.url));

export interface ServeChild {
  readonly child: ChildProcess;
  /** The first URL the service printed, e.g. http://127.0.0.1:41234/. */
  readonly url: string;
  readonly port: number;
  readonly exited: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  /** What the child wrote on stdout and (the last 20,000 characters of) stderr, for failure messages. */
  readonly output: () => string;
}

/** Starts `serve` with `args` and resolves once it prints where it listens (rejects on exit or after `timeoutMs`). */
export function startServeChild(args: readonly string[], timeoutMs = 15_000): Promise<ServeChild> {
  if (!existsSync(CLI)) throw new Error('dist/server/cli.js is missing: run `npm run build` before this test');
  const child = spawn(process.execPath, [CLI, 'serve', ...args], { stdio: ['ignore', 'pipe', 'pipe'] });
  let stdout = '';
  let stderr = '';
  // Request logs go to stderr: keep the tail, and keep the pipe drained.
  child.stderr!.on('data', (chunk: Buffer) => (stderr = (stderr + chunk.toString('utf8')).slice(-20_000)));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.once('exit', (code, signal) => resolve({ code, signal })));
  const output = () => `${stdout}${stderr}`;
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => reject(new Error(`serve did not print its URL within ${timeoutMs} ms: ${output()}`)), timeoutMs);
    child.stdout!.on('data', (chunk: Buffer) => {
      stdout += chunk.toString('utf8');
      const match = /open:\n\s+(http:\/\/127\.0\.0\.1:(\d+)\/)/.exec(stdout);
      if (match) {
        clearTimeout(timer);
        resolve({ child, url: match[1]!, port: Number(match[2]), exited, output });
      }
    });
    void exited.then(({ code, signal }) => {
      clearTimeout(timer);
      reject(new Error(`serve exited (code ${code}, signal ${signal}) before printing its URL: ${output()}`));
    });
  });
}
