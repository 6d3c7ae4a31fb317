/** The look every plot shares (kept apart from the plotly loader so the figure modules stay pure). */

export const PLOT_THEME = {
  paper: '#ffffff',
  plot: '#fbfaf7',
  grid: '#e6e1d6',
  ink: '#1d2a2f',
  muted: '#5b6b70',
  font: 'system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif',
} as const;

/** The layout every plot starts from: colours, font, margins, a legend along the top, closest-point hover. */
export const BASE_LAYOUT = {
  hovermode: 'closest',
  paper_bgcolor: PLOT_THEME.paper,
  plot_bgcolor: PLOT_THEME.plot,
  font: { family: PLOT_THEME.font, size: 13, color: PLOT_THEME.ink },
  margin: { l: 70, r: 20, t: 16, b: 56 },
  legend: { orientation: 'h', x: 0, y: 1.02, yanchor: 'bottom', font: { size: 12 } },
} as const;

/** The x axis of every plot: position along the line in the survey's distance unit. */
export function positionAxis(distanceUnit: string): Record<string, unknown> {
  return { title: { text: `Position along the line (${distanceUnit})` }, gridcolor: PLOT_THEME.grid, zeroline: false };
}
