/**
 * Phase names of the trade (METHODS §10: Pg the crustal direct/diving wave, Pn the head wave under
 * the Moho, ~7.8–8.2 km/s; the Moho put where Vp reaches 7.6 km/s, Steinhart 1967 via Mooney,
 * Prodehl & Pavlenkova 2002). The lower-crust head wave is called P* (common practice).
 */
import { describe, expect, it } from 'vitest';
import { MOHO_VELOCITY, phaseNames } from '../../lib/interpretation/phase-names.js';

describe('phaseNames', () => {
  it('iasp91 crust and mantle (Kennett & Engdahl 1991: 5.8, 6.5, 8.04 km/s) read Pg, P*, Pn', () => {
    expect(phaseNames([5800, 6500, 8040], 'crustal')).toEqual(['Pg', 'P*', 'Pn']);
  });

  it('a two-layer crustal reading (Pg over Pn) and a crust whose deepest refractor is below 7.6 km/s (no Pn)', () => {
    expect(phaseNames([6300, 8000], 'crustal')).toEqual(['Pg', 'Pn']);
    expect(phaseNames([5800, 6500, 7000], 'crustal')).toEqual(['Pg', 'P*₁', 'P*₂']);
    expect(phaseNames([5800, 7599], 'crustal')).toEqual(['Pg', 'P*']);
  });

  it('the Moho threshold is 7.6 km/s, inclusive (Mooney et al. 2002)', () => {
    expect(MOHO_VELOCITY).toBe(7600);
    expect(phaseNames([6000, 7600], 'crustal')).toEqual(['Pg', 'Pn']);
  });

  it('several crustal refractors are numbered from the top; a refractor below the Moho is named by its index', () => {
    expect(phaseNames([5000, 5800, 6500, 8100], 'crustal')).toEqual(['Pg', 'P*₁', 'P*₂', 'Pn']);
    expect(phaseNames([5800, 8040, 8500], 'crustal')).toEqual(['Pg', 'Pn', 'P, refractor 2']);
  });

  it('engineering scale uses direct wave and refractor n, whatever the velocities', () => {
    expect(phaseNames([500, 2000, 8000], 'engineering')).toEqual(['direct wave', 'refractor 1', 'refractor 2']);
    expect(phaseNames([], 'crustal')).toEqual([]);
  });
});
