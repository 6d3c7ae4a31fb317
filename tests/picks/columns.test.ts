/**
 * The pick-table column table and header-name matching (lib/picks/columns.ts), checked against
 * the column list of the pick-table contract in the design (the table of columns and units).
 */
import { describe, expect, it } from 'vitest';
import { columnName, identifyColumn, PICK_TABLE_COLUMNS } from '../../lib/picks/index.js';

describe('PICK_TABLE_COLUMNS', () => {
  it('PICK_TABLE_COLUMNS lists exactly the names of the contract', () => {
    const contract = [
      'shot', 'receiver',
      'source_x_m', 'source_x_km', 'source_x_ft', 'receiver_x_m', 'receiver_x_km', 'receiver_x_ft',
      'source_lat', 'source_lon', 'receiver_lat', 'receiver_lon',
      'time_ms', 'time_s', 'sigma_ms', 'sigma_s', 'branch',
      'source_elev_m', 'source_elev_km', 'source_elev_ft', 'receiver_elev_m', 'receiver_elev_km', 'receiver_elev_ft',
      'source_depth_m', 'source_depth_km', 'source_depth_ft', 'uphole_ms', 'uphole_s',
    ];
    expect(PICK_TABLE_COLUMNS.flatMap((column) => column.names)).toEqual(contract);
  });

  it('PICK_TABLE_COLUMNS requires shot and time always, and x or lat/lon for positions', () => {
    const needs = Object.fromEntries(PICK_TABLE_COLUMNS.map((column) => [column.stem, column.need]));
    expect(needs).toMatchObject({ shot: 'required', time: 'required', source_x: 'line', receiver_x: 'line', source_lat: 'geographic', receiver_lon: 'geographic', sigma: 'optional', branch: 'optional' });
  });
});

describe('identifyColumn', () => {
  it('identifyColumn matches case-insensitively and ignores surrounding whitespace', () => {
    const identity = identifyColumn('  Time_MS\t');
    expect(identity.status === 'known' && [identity.column.quantity, identity.unit, identity.scale.size]).toEqual(['time', 'ms', 0.001]);
  });

  it('identifyColumn gives each unit its SI size (ft = 0.3048 m, NIST SP 811)', () => {
    const sizes = ['receiver_x_m', 'receiver_x_km', 'receiver_x_ft', 'uphole_s'].map((name) => {
      const identity = identifyColumn(name);
      return identity.status === 'known' ? identity.scale.size : Number.NaN;
    });
    expect(sizes).toEqual([1, 1000, 0.3048, 1]);
  });

  it('identifyColumn tells an unknown unit suffix, a missing unit and an unknown name apart', () => {
    expect(identifyColumn('time_us')).toMatchObject({ status: 'unit-unknown', suffix: 'us', column: { stem: 'time' } });
    expect(identifyColumn('source_x_yd')).toMatchObject({ status: 'unit-unknown', suffix: 'yd', column: { stem: 'source_x' } });
    expect(identifyColumn('source_lat_deg')).toMatchObject({ status: 'unit-unknown', suffix: 'deg', column: { stem: 'source_lat' } });
    expect(identifyColumn('source_depth')).toMatchObject({ status: 'unit-missing', column: { stem: 'source_depth' } });
    expect(identifyColumn('geophone')).toEqual({ status: 'unknown' });
    expect(identifyColumn('')).toEqual({ status: 'unknown' });
    expect(identifyColumn('_ms')).toEqual({ status: 'unknown' });
  });
});

describe('columnName', () => {
  it('columnName spells a quantity in a unit, and refuses a unit the quantity does not take', () => {
    expect(columnName('receiverElevation', 'ft')).toBe('receiver_elev_ft');
    expect(columnName('branch')).toBe('branch');
    expect(() => columnName('time', 'km')).toThrow(/time_ms or time_s, not time_km/);
  });
});
