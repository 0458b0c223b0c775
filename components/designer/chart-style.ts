/**
 * Colours and font the designer's SVG charts share, written out explicitly so
 * an exported SVG or PNG looks as it does on screen (the colours are the
 * ink-100/300/500 tokens of tailwind.config.ts).
 */
export const CHART_INK = {
  grid: '#e3e9ee',
  axis: '#9fb1c1',
  text: '#4e667b',
} as const;

export const CHART_FONT = 'IBM Plex Sans, ui-sans-serif, sans-serif';
