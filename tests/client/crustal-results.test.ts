/**
 * The browser client's crustal-profile tables (client/src/crustal-results.ts), built from the
 * project's engine output as the oracle: lib's interpretation of the demo survey
 * sample-surveys/vellmark-crustal-profile.csv (invented data: a 480 km profile in latitude and
 * longitude, one station 13 km off the line) and of sample-surveys/millbrook-quarry-bedrock.csv
 * (engineering scale: no crustal block). Each check is that the right engine value lands in the
 * right cell, formatted by the same functions (format.ts).
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { plain, withError } from '../../client/src/format.js';
import { earthCurvatureSentence, OFF_LINE_MARK, offLineTable, sphericalLayerTable, stationDepthTable, timeTermSentence } from '../../client/src/crustal-results.js';
import { interpret } from '../../lib/interpret.js';
import { asClient, engineView, readTable } from './engine-inputs.js';

const sampleText = (name: string): string => readFileSync(new URL(`../../sample-surveys/${name}.csv`, import.meta.url), 'utf8');
// At the scale the table suggests (crustal: km, s, km/s), as the service stores a crustal survey.
const VELLMARK = interpret(readTable(sampleText('vellmark-crustal-profile')));
const MILLBROOK = engineView(readTable(sampleText('millbrook-quarry-bedrock')));

describe('crustal-profile tables', () => {
  it('the crustal sample is read in km, s, km/s', () => {
    expect(VELLMARK.units).toEqual({ scale: 'crustal', distance: 'km', time: 's', velocity: 'km/s' });
  });

  it('earthCurvatureSentence says which earth was used, the longest offset and the flat-earth limit, in display units', () => {
    const curvature = VELLMARK.earthCurvature!;
    const sentence = earthCurvatureSentence(asClient(VELLMARK))!;
    expect(sentence.startsWith(curvature.applied ? 'Spherical earth (asked: auto)' : 'Flat earth (asked: auto)')).toBe(true);
    expect(sentence).toContain(`reach ${plain(curvature.maxOffset, 4)}\u202fkm`);
    expect(sentence).toContain(`beyond ${plain(curvature.flatErrorOffset!, 4)}\u202fkm`);
    expect(earthCurvatureSentence(asClient(MILLBROOK))).not.toContain('Spherical');
  });

  it('sphericalLayerTable lists lib\'s sphere-fitted layers with ± SE and the flat reading\'s bias beside them', () => {
    const curvature = VELLMARK.earthCurvature!;
    const table = sphericalLayerTable(asClient(VELLMARK));
    expect(table.caption).toContain(curvature.applied ? 'use these' : 'not applied');
    expect(table.rows.map((row) => row.key)).toEqual(curvature.sphericalLayers.map((layer) => String(layer.index)));
    curvature.sphericalLayers.forEach((layer, k) => {
      const cells = table.rows[k]!.cells;
      expect(cells[0]!.text).toBe(`${layer.index} ${layer.phase}`);
      expect(cells[1]!.text).toBe(withError(layer.velocity, layer.velocitySE));
    });
    // The mantle's bias: a flat reading is fast (positive), written with its sign.
    expect(curvature.flatBias!.velocity[1]!).toBeGreaterThan(0);
    expect(table.rows[1]!.cells[4]!.text.startsWith('+')).toBe(true);
    expect(table.footnotes.join(' ')).toContain(`${curvature.fit!.pickCount} picks`);
  });

  it('offLineTable lists exactly the points lib warns are off the line, marked in words, farthest first', () => {
    const warned = VELLMARK.warnings.filter((warning) => warning.code === 'station-off-line');
    expect(warned.length).toBe(1);
    const table = offLineTable(asClient(VELLMARK));
    expect(table.rows.map((row) => row.key)).toEqual(['station VM048']);
    expect(warned[0]!.message).toContain('VM048');
    const station = VELLMARK.geometry!.stations.find((entry) => entry.station === 'VM048')!;
    expect(table.rows[0]!.cells[3]!.text).toBe(`${plain(Math.abs(station.offLineDistance), 3)} ${station.offLineDistance >= 0 ? 'right' : 'left'}`);
    expect(table.rows[0]!.cells[3]!.mark).toBe(OFF_LINE_MARK);
    expect(table.footnotes[0]).toContain('geodesic');
  });

  it('stationDepthTable lists every station of lib\'s time terms along the line, with its term and depth ± SE', () => {
    const terms = VELLMARK.timeTerms!;
    const table = stationDepthTable(asClient(VELLMARK));
    expect(table.rows.map((row) => row.key)).toEqual(terms.stations.map((station) => station.id));
    terms.stations.forEach((station, k) => {
      const cells = table.rows[k]!.cells;
      expect(cells[2]!.text).toBe(withError(station.term, station.termSE));
      expect(cells[4]!.text).toBe(station.depth === null ? '—' : withError(station.depth, station.depthSE));
    });
    // Shots stand at stations VM001, VM025, …: those rows say so.
    expect(table.rows[0]!.cells[0]!.details).toEqual([`shares its term with shot ${terms.stations[0]!.sharedWith}`]);
    expect(timeTermSentence(asClient(VELLMARK))).toContain(`velocity ${withError(terms.velocity, terms.velocitySE)}\u202fkm/s`);
    expect(timeTermSentence(asClient(VELLMARK))).toContain('along the surface');
  });

  it('an engineering survey along a line has no geometry, and no off-line rows', () => {
    expect(MILLBROOK.geometry).toBeNull();
    expect(offLineTable(asClient(MILLBROOK)).rows).toEqual([]);
  });
});
