/**
 * plotly.js, loaded once as its own chunk (from the npm package, served by this server: no CDN),
 * so the survey list shows before the plotting library is parsed.
 *
 * The "strict" bundle (`plotly.js-strict-dist-min`): its WebGL traces use precompiled shaders
 * instead of compiling code at run time, so they draw under the service's Content-Security-Policy
 * (`script-src 'self'`, no `unsafe-eval`); the standard bundle's WebGL traces do not.
 *
 * The package ships no type declarations: `Plotly` below types the few functions the client uses.
 */

/** Traces, layout and config are plain objects built by the figure modules. */
type Figure = readonly Record<string, unknown>[];
type Options = Record<string, unknown>;

export interface Plotly {
  newPlot(element: HTMLElement, data: Figure, layout?: Options, config?: Options): Promise<HTMLElement>;
  react(element: HTMLElement, data: Figure, layout?: Options, config?: Options): Promise<HTMLElement>;
  relayout(element: HTMLElement, update: Options): Promise<HTMLElement>;
  toImage(element: HTMLElement, options: { format: 'png' | 'svg'; width: number; height: number; scale?: number }): Promise<string>;
  downloadImage(element: HTMLElement, options: { format: 'png' | 'svg'; filename: string; width: number; height: number; scale?: number }): Promise<string>;
  purge(element: HTMLElement): void;
}

let loading: Promise<Plotly> | null = null;

export function loadPlotly(): Promise<Plotly> {
  loading ??= import('plotly.js-strict-dist-min').then((module: { default?: unknown }) => (module.default ?? module) as Plotly);
  return loading;
}

/** True when this browser can draw WebGL (else the plots stay SVG: slower, but they draw). */
export function webglAvailable(): boolean {
  try {
    const canvas = document.createElement('canvas');
    return canvas.getContext('webgl') !== null || canvas.getContext('experimental-webgl') !== null;
  } catch {
    return false;
  }
}
