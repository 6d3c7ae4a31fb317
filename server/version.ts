/** The software version, read once from package.json next to the build. */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

export function softwareVersion(): string {
  // server/ (source, via vitest) and dist/server/ (build) both find package.json upwards.
  let folder = dirname(fileURLToPath(import.meta.url));
  for (let depth = 0; depth < 4; depth += 1) {
    try {
      const text = readFileSync(join(folder, 'package.json'), 'utf8');
      const parsed = JSON.parse(text) as { name?: string; version?: string };
      if (parsed.name === 'slopebreak' && parsed.version) return parsed.version;
    } catch {
      // not here; look one folder up
    }
    folder = dirname(folder);
  }
  return '0.0.0';
}
