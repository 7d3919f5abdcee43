import type { Config } from 'tailwindcss';

/**
 * Wellkept's palette lives in CSS variables (src/styles/theme.css) as "r g b" triples, so one
 * set of class names serves light and dark: the `.dark` class on <html> swaps the variables.
 * Tremor's own tokens (tremor-*, dark-tremor-*) point at the same variables.
 */
const v = (name: string) => `rgb(var(--wk-${name}) / <alpha-value>)`;

const tremorTokens = {
  brand: {
    faint: v('brand-faint'),
    muted: v('brand-muted'),
    subtle: v('brand-subtle'),
    DEFAULT: v('brand'),
    emphasis: v('brand-strong'),
    inverted: v('on-brand'),
  },
  background: {
    muted: v('sunken'),
    subtle: v('raised'),
    DEFAULT: v('surface'),
    emphasis: v('ink-soft'),
  },
  border: { DEFAULT: v('line') },
  ring: { DEFAULT: v('line') },
  content: {
    subtle: v('ink-faint'),
    DEFAULT: v('ink-soft'),
    emphasis: v('ink'),
    strong: v('ink-strong'),
    inverted: v('surface'),
  },
};

export default {
  darkMode: 'class',
  content: {
    // Paths relative to this file, whichever folder Vite is started from.
    relative: true,
    files: [
      './index.html',
      './src/**/*.{ts,tsx}',
      // Tremor's class names live in its bundle; node_modules is at the repository root
      // (npm may also nest Tremor under the workspace).
      '../node_modules/@tremor/**/*.{js,ts,jsx,tsx}',
      './node_modules/@tremor/**/*.{js,ts,jsx,tsx}',
    ],
  },
  theme: {
    transparent: 'transparent',
    current: 'currentColor',
    extend: {
      fontFamily: {
        sans: ['Inter', 'system-ui', 'sans-serif'],
        mono: ['"JetBrains Mono"', 'ui-monospace', 'monospace'],
      },
      // A compact type scale: figures are the heroes, labels stay quiet.
      fontSize: {
        label: ['0.75rem', { lineHeight: '1rem', letterSpacing: '0.02em' }],
        body: ['0.9375rem', { lineHeight: '1.4rem' }],
        figure: ['1.625rem', { lineHeight: '2rem', letterSpacing: '-0.01em' }],
        headline: ['1.375rem', { lineHeight: '1.8rem', letterSpacing: '-0.01em' }],
        'tremor-label': ['0.75rem', { lineHeight: '1rem' }],
        'tremor-default': ['0.875rem', { lineHeight: '1.25rem' }],
        'tremor-title': ['1.125rem', { lineHeight: '1.75rem' }],
        'tremor-metric': ['1.625rem', { lineHeight: '2rem' }],
      },
      colors: {
        wk: {
          surface: v('surface'),
          raised: v('raised'),
          sunken: v('sunken'),
          line: v('line'),
          ink: v('ink'),
          'ink-strong': v('ink-strong'),
          'ink-soft': v('ink-soft'),
          'ink-faint': v('ink-faint'),
          brand: v('brand'),
          'brand-strong': v('brand-strong'),
          'brand-faint': v('brand-faint'),
          'on-brand': v('on-brand'),
          sun: v('sun'),
          steady: v('steady'),
          watch: v('watch'),
          act: v('act'),
          silent: v('silent'),
        },
        tremor: tremorTokens,
        'dark-tremor': tremorTokens,
      },
      boxShadow: {
        'tremor-input': '0 1px 2px 0 rgb(0 0 0 / 0.05)',
        'tremor-card': '0 1px 2px 0 rgb(16 24 22 / 0.06), 0 0 0 1px rgb(16 24 22 / 0.02)',
        'tremor-dropdown': '0 6px 16px -4px rgb(16 24 22 / 0.18)',
        'dark-tremor-input': '0 1px 2px 0 rgb(0 0 0 / 0.3)',
        'dark-tremor-card': '0 1px 2px 0 rgb(0 0 0 / 0.4)',
        'dark-tremor-dropdown': '0 6px 16px -4px rgb(0 0 0 / 0.5)',
      },
      borderRadius: {
        'tremor-small': '0.375rem',
        'tremor-default': '0.625rem',
        'tremor-full': '9999px',
      },
    },
  },
  plugins: [],
} satisfies Config;
