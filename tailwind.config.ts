import type { Config } from 'tailwindcss';

/**
 * Hotlap's own palette: "ember" (a hot-nozzle orange) for action, "slate-ink" neutrals for text,
 * "coolant" teal for verified/pass states. Colours are ours; names describe their role.
 */
const config: Config = {
  content: ['./app/**/*.{ts,tsx}', './components/**/*.{ts,tsx}'],
  theme: {
    extend: {
      colors: {
        ember: {
          50: '#fff6ed', 100: '#ffe9d3', 200: '#ffcfa5', 300: '#ffad6d', 400: '#fd8034',
          500: '#f25f0e', 600: '#d74707', 700: '#b2340a', 800: '#8e2b10', 900: '#742610',
        },
        ink: {
          50: '#f5f7f8', 100: '#e7ebee', 200: '#cfd6dc', 300: '#a9b5bf', 400: '#7c8c99',
          500: '#5f6f7d', 600: '#4b5966', 700: '#3e4954', 800: '#283038', 900: '#161b20',
        },
        coolant: { 50: '#eefbf8', 100: '#d5f5ee', 500: '#159c86', 600: '#0d7f6e', 700: '#0e665a' },
        alarm: { 50: '#fdf2f2', 100: '#fbe0e0', 500: '#d33a3a', 600: '#b52a2a', 700: '#922424' },
      },
      fontFamily: {
        sans: ['var(--font-manrope)', 'system-ui', 'sans-serif'],
        mono: ['var(--font-jetbrains)', 'ui-monospace', 'monospace'],
      },
    },
  },
};

export default config;
