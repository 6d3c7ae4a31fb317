/** The look every plot shares (kept apart from the plotly loader so the figure modules stay pure). */

export const PLOT_THEME = {
  paper: '#ffffff',
  plot: '#fbfaf7',
  grid: '#e6e1d6',
  ink: '#1d2a2f',
  muted: '#5b6b70',
  font: 'system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif',
} as const;
