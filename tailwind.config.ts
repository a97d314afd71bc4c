import type { Config } from 'tailwindcss';

// Colours are CSS variables (app/globals.css) so both themes share one set of class names.
const config: Config = {
  darkMode: 'class',
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        paper: 'var(--paper)',
        sheet: 'var(--sheet)',
        ink: 'var(--ink)',
        muted: 'var(--muted)',
        rule: 'var(--rule)',
        heater: 'var(--heater)',
        'heater-ink': 'var(--heater-ink)',
        dcline: 'var(--dcline)',
        acline: 'var(--acline)',
        limit: 'var(--limit)',
        ok: 'var(--ok)',
        near: 'var(--near)',
        over: 'var(--over)',
      },
      fontFamily: {
        sans: ['var(--font-sans)', 'var(--font-sans-greek)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-mono)', 'var(--font-mono-greek)', 'ui-monospace', 'monospace'],
      },
    },
  },
};

export default config;
