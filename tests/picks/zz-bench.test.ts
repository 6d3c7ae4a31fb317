import { it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
it('bench', () => {
  const rows = ['shot,receiver,source_x_m,receiver_x_m,time_ms,sigma_ms'];
  for (let shot = 0; shot < 10000; shot += 1) for (let r = 0; r < 100; r += 1) rows.push(`P${shot},G${r},${shot * 0.5},${r * 5},${(Math.abs(r * 5 - shot * 0.5) / 1.5).toFixed(6)},0.3`);
  const bytes = Buffer.from(rows.join('\n') + '\n');
  console.log('MB', bytes.length / 1e6);
  for (let k = 0; k < 2; k++) {
    const before = process.memoryUsage().heapUsed;
    const t = performance.now();
    const o = readPickTable(bytes);
    console.log('ms', performance.now() - t, o.ok, 'heap MB', (process.memoryUsage().heapUsed - before) / 1e6);
  }
});
