import type { Config } from 'tailwindcss'

// Umbrafield's own palette: night-sky indigo ("umbra"), coronal gold, a prominence red for
// warnings and a warm paper white for print-friendly pages.
export default {
  content: ['./components/**/*.vue', './layouts/**/*.vue', './pages/**/*.vue', './app.vue', './error.vue', './composables/**/*.ts'],
  theme: {
    extend: {
      colors: {
        umbra: {
          50: '#f5f4fa', 100: '#e9e7f4', 200: '#d2cee8', 300: '#aea7d3', 400: '#8479b8',
          500: '#62579b', 600: '#4b417f', 700: '#383063', 800: '#27224a', 900: '#1a1633', 950: '#0e0c1d',
        },
        corona: {
          50: '#fff9eb', 100: '#fdefc9', 200: '#fadd8e', 300: '#f6c75a', 400: '#eeae33',
          500: '#d8901b', 600: '#b26f12', 700: '#8a5312', 800: '#6b4115', 900: '#573515',
        },
        prominence: { 50: '#fdf2f1', 100: '#fbe1de', 500: '#c9453a', 600: '#a8362d', 700: '#872b25' },
        meadow: { 50: '#effaf3', 100: '#d5f2df', 500: '#2f8f5b', 600: '#23734a', 700: '#1c5b3c' },
        paper: '#fbf9f4',
      },
      fontFamily: {
        sans: ['"Work Sans"', 'system-ui', 'sans-serif'],
      },
      fontSize: {
        // A compact scale: planners read dense tables; guides read big countdown numbers.
        'label': ['0.75rem', { lineHeight: '1rem', letterSpacing: '0.04em' }],
        'body': ['0.9375rem', { lineHeight: '1.5rem' }],
        'lead': ['1.125rem', { lineHeight: '1.75rem' }],
        'title': ['1.5rem', { lineHeight: '2rem', letterSpacing: '-0.01em' }],
        'display': ['2.5rem', { lineHeight: '2.875rem', letterSpacing: '-0.02em' }],
        'countdown': ['5rem', { lineHeight: '1', letterSpacing: '-0.03em' }],
      },
      boxShadow: { card: '0 1px 2px rgba(14,12,29,0.06), 0 4px 16px rgba(14,12,29,0.06)' },
    },
  },
  plugins: [],
} satisfies Config
