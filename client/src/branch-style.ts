/**
 * How each branch is drawn: a colour from the Okabe–Ito palette, chosen so that the common forms
 * of colour blindness still tell the colours apart (Okabe & Ito 2008, "Color Universal Design"),
 * and a distinct marker shape as well, so that the branches stay apart in greyscale print too.
 * Branch 1 is the direct wave; n ≥ 2 is the head wave along the top of layer n.
 */

export interface BranchStyle {
  readonly color: string;
  readonly symbol: string;
  readonly dash: 'solid' | 'dash' | 'dot' | 'dashdot' | 'longdash' | 'longdashdot';
}

const STYLES: readonly BranchStyle[] = [
  { color: '#0072B2', symbol: 'circle', dash: 'solid' },
  { color: '#D55E00', symbol: 'square', dash: 'solid' },
  { color: '#009E73', symbol: 'diamond', dash: 'solid' },
  { color: '#CC79A7', symbol: 'triangle-up', dash: 'solid' },
  { color: '#E69F00', symbol: 'cross', dash: 'solid' },
  { color: '#56B4E9', symbol: 'triangle-down', dash: 'solid' },
  { color: '#000000', symbol: 'pentagon', dash: 'solid' },
];

export function branchStyle(index: number): BranchStyle {
  return STYLES[(Math.max(1, index) - 1) % STYLES.length]!;
}

/** Picks the user excluded from every fit: hollow grey. */
export const EXCLUDED_STYLE = { color: '#8a8a8a', symbol: 'x-thin-open' } as const;
/** Picks that ended on no branch: hollow dark. */
export const UNASSIGNED_STYLE = { color: '#3d3d3d', symbol: 'circle-open' } as const;
/** The selection ring drawn over selected picks. */
export const SELECTED_STYLE = { color: '#111111', symbol: 'circle-open' } as const;
