/**
 * Colours and type for every chart, on the tokens of tailwind.config.ts.
 * One colour per estimation method, keyed by the v1 API method id, so a
 * method keeps its colour on the run page, in studies and in exports.
 */
export const CHART_FONT = 'IBM Plex Sans, ui-sans-serif, system-ui, sans-serif';

/** ink-100 (grid), ink-300 (axes), ink-500 (labels), ink-800 (titles), and the accents used by the figures. */
export const INK = {
  grid: '#e3e9ee',
  axis: '#9fb1c1',
  text: '#4e667b',
  strong: '#1b2938',
  muted: '#6f879c',
  faint: '#c6d2dc',
} as const;

export const ACCENT = {
  teal: '#207b6d',
  tealLight: '#2b9986',
  tealFill: 'rgba(43,153,134,0.10)',
  amber: '#e0780b',
  coral: '#c13a26',
  coralLight: '#e0533d',
  steer: '#2a3c4d',
} as const;

/** The single method → colour map. */
export const METHOD_COLOURS: Readonly<Record<string, string>> = {
  'esprit-ls': '#207b6d',
  'esprit-tls': '#bb5606',
  'esprit-unitary': '#6d4fc2',
  'root-music': '#c13a26',
  music: '#2f6fb5',
  bartlett: '#5f7f1f',
  mvdr: '#8a4f7d',
  /** The stochastic Cramér–Rao bound drawn beside the methods (studies). */
  crb: '#111c28',
};

export function methodColour(method: string): string {
  return METHOD_COLOURS[method] ?? INK.text;
}
