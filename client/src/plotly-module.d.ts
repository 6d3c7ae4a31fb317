/** The strict plotly bundle has no type declarations of its own; plotly-loader.ts types what is used. */
declare module 'plotly.js-strict-dist-min' {
  const plotly: unknown;
  export default plotly;
}
