/**
 * plotly.js, loaded once as its own chunk (from the npm package, served by this server: no CDN),
 * so the survey list shows before the plotting library is parsed.
 */
import type PlotlyModule from 'plotly.js-dist-min';

export type Plotly = typeof PlotlyModule;

let loading: Promise<Plotly> | null = null;

export function loadPlotly(): Promise<Plotly> {
  loading ??= import('plotly.js-dist-min').then((module) => ((module as { default?: Plotly }).default ?? (module as unknown as Plotly)));
  return loading;
}

/** The colours and fonts every plot shares. */
export const PLOT_THEME = {
  paper: '#ffffff',
  plot: '#fbfaf7',
  grid: '#e6e1d6',
  ink: '#1d2a2f',
  muted: '#5b6b70',
  font: 'system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", sans-serif',
} as const;
