import type { Config } from 'tailwindcss';

/**
 * Steerwise design tokens. Loaded from app/globals.css with `@config`.
 * ink: the navigation rail and headings; glass: the sea-glass teal accent;
 * amber: warnings and cautions; coral: errors and refusals; paper: surfaces.
 */
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ink: {
          50: '#f3f6f8',
          100: '#e3e9ee',
          200: '#c6d2dc',
          300: '#9fb1c1',
          400: '#6f879c',
          500: '#4e667b',
          600: '#3a5063',
          700: '#2a3c4d',
          800: '#1b2938',
          900: '#111c28',
          950: '#0a121b',
        },
        glass: {
          50: '#eefaf7',
          100: '#d3f2ea',
          200: '#a9e4d6',
          300: '#75cfbd',
          400: '#46b5a1',
          500: '#2b9986',
          600: '#207b6d',
          700: '#1d6259',
          800: '#1b4f49',
          900: '#19423d',
        },
        amber: {
          50: '#fff8eb',
          100: '#feeac7',
          200: '#fcd38a',
          300: '#fab54d',
          400: '#f79a24',
          500: '#e0780b',
          600: '#bb5606',
          700: '#953c0a',
        },
        coral: {
          50: '#fff3f1',
          100: '#ffe2dd',
          500: '#e0533d',
          600: '#c13a26',
          700: '#9c2f1f',
        },
        paper: '#f7f9fa',
      },
      fontFamily: {
        sans: ['var(--font-plex-sans)', 'ui-sans-serif', 'system-ui', 'sans-serif'],
        mono: ['var(--font-plex-mono)', 'ui-monospace', 'monospace'],
      },
      fontSize: {
        '2xs': ['0.6875rem', { lineHeight: '1rem' }],
      },
      borderRadius: {
        card: '0.625rem',
      },
      boxShadow: {
        card: '0 1px 2px rgb(10 18 27 / 0.06), 0 1px 1px rgb(10 18 27 / 0.04)',
      },
    },
  },
};

export default config;
