/**
 * How each branch is drawn: a colour from the Okabe–Ito palette, chosen so that the common forms
 * of colour blindness still tell the colours apart (Okabe & Ito 2008, "Color Universal Design"),
 * and a distinct marker shape as well, so that the branches stay apart in greyscale print too.
 * Branch 1 is the direct wave; n ≥ 2 is the head wave along the top of layer n.
 */

export interface BranchStyle {
  readonly color: string;
  /** Text drawn on the colour (branch chips): black or white, whichever reads at WCAG AA (≥ 4.5:1). */
  readonly text: '#000000' | '#ffffff';
  readonly symbol: string;
  /** Fitted lines differ by dash as well as colour. */
  readonly dash: 'solid' | 'dash' | 'dot' | 'dashdot' | 'longdash' | 'longdashdot';
}

const STYLES: readonly BranchStyle[] = [
  { color: '#0072B2', text: '#ffffff', symbol: 'circle', dash: 'solid' },
  { color: '#D55E00', text: '#000000', symbol: 'square', dash: 'dash' },
  { color: '#009E73', text: '#000000', symbol: 'diamond', dash: 'dot' },
  { color: '#CC79A7', text: '#000000', symbol: 'triangle-up', dash: 'dashdot' },
  { color: '#E69F00', text: '#000000', symbol: 'cross', dash: 'longdash' },
  { color: '#56B4E9', text: '#000000', symbol: 'triangle-down', dash: 'longdashdot' },
  { color: '#000000', text: '#ffffff', symbol: 'pentagon', dash: 'solid' },
];

export function branchStyle(index: number): BranchStyle {
  return STYLES[(Math.max(1, index) - 1) % STYLES.length]!;
}

/** Picks the user excluded from every fit: hollow grey. */
export const EXCLUDED_STYLE = { color: '#8a8a8a', symbol: 'x-thin-open' } as const;
/** Picks that ended on no branch: hollow dark. */
export const UNASSIGNED_STYLE = { color: '#3d3d3d', symbol: 'hexagon-open' } as const;
/** The selection ring drawn over selected picks. */
/** Ringed in magenta-red, unlike the black crossover rings. */
export const SELECTED_STYLE = { color: '#C2185B', symbol: 'circle-open' } as const;
