import type { Config } from 'tailwindcss'

// Umbrafield's own palette: night-sky indigo ("umbra"), coronal gold, a prominence red for
// warnings and a warm paper white for print-friendly pages.
//
// Contrast is settled here, not page by page (WCAG 2.2 AA; tests/unit/palette.spec.ts checks it):
// - text shades (umbra-400 and darker, corona-700+, prominence-600+, meadow-600+) reach 4.5:1 on every light
//   surface (white, paper, the 50 and 100 tints);
// - umbra-300 (unselected controls, input borders) and corona-500 (focus ring, selected marks) reach 3:1 on
//   white and paper, as non-text parts of controls must;
// - the light shades (umbra-50..300, corona-100..400) reach 4.5:1 as text on the dark header (umbra-800..950).
export default {
  content: ['./components/**/*.vue', './layouts/**/*.vue', './pages/**/*.vue', './app.vue', './error.vue', './composables/**/*.ts'],
  theme: {
    extend: {
      colors: {
        umbra: {
          50: '#f5f4fa', 100: '#e9e7f4', 200: '#d2cee8', 300: '#928ac2', 400: '#675ca1',
          500: '#62579b', 600: '#4b417f', 700: '#383063', 800: '#27224a', 900: '#1a1633', 950: '#0e0c1d',
        },
        corona: {
          50: '#fff9eb', 100: '#fdefc9', 200: '#fadd8e', 300: '#f6c75a', 400: '#eeae33',
          500: '#bd7a0e', 600: '#b26f12', 700: '#8a5312', 800: '#6b4115', 900: '#573515',
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
