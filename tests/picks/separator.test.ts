/**
 * sniffForeignSeparator: one test per edge its doc comment names. The inputs are headers as
 * spreadsheet programs save them with a semicolon list separator or copy them as tab-separated
 * text (common practice); the expected answers follow from the pick-table contract's column names.
 */
import { describe, expect, it } from 'vitest';
import { sniffForeignSeparator } from '../../lib/picks/index.js';

const SEMICOLONS = { separator: ';', name: 'semicolons' };
const TABS = { separator: '\t', name: 'tabs' };

describe('sniffForeignSeparator', () => {
  it('sniffForeignSeparator finds semicolons and tabs between pick-table names', () => {
    expect(sniffForeignSeparator('shot;source_x_m;receiver_x_m;time_ms')).toEqual(SEMICOLONS);
    expect(sniffForeignSeparator('shot\tsource_x_m\treceiver_x_m\ttime_ms')).toEqual(TABS);
  });

  it('sniffForeignSeparator accepts padded and double-quoted names, and names with a wrong or missing unit', () => {
    expect(sniffForeignSeparator(' "Shot" ; "Time_MS" ')).toEqual(SEMICOLONS);
    expect(sniffForeignSeparator('shot;time;source_x_yd')).toEqual(SEMICOLONS);
  });

  it('sniffForeignSeparator says null for any line with a comma, semicolons or tabs notwithstanding', () => {
    expect(sniffForeignSeparator('shot;source_x_m;receiver_x_m;time_ms,')).toBeNull();
    expect(sniffForeignSeparator('shot,source_x_m,receiver_x_m,time_ms\tnotes;remarks')).toBeNull();
  });

  it('sniffForeignSeparator needs two known names: one is not enough', () => {
    expect(sniffForeignSeparator('shot;notes')).toBeNull();
    expect(sniffForeignSeparator('shot')).toBeNull();
    expect(sniffForeignSeparator('station;easting;northing')).toBeNull();
  });

  it('sniffForeignSeparator picks the separator between more known names, semicolons on a tie', () => {
    expect(sniffForeignSeparator('shot;time_ms;source_x_m\treceiver_x_m')).toEqual(SEMICOLONS);
    expect(sniffForeignSeparator('shot\ttime_ms\tsource_x_m;receiver_x_m')).toEqual(TABS);
    // ";" separates shot and time_ms; a tab separates source_x_m and receiver_x_m: two known names each.
    expect(sniffForeignSeparator('shot;time_ms;x\tsource_x_m\treceiver_x_m')).toEqual(SEMICOLONS);
  });
});
