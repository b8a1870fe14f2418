import type { Config } from 'tailwindcss'

// Isthmus palette: basalt greys, a warm regolith accent and a cold ice accent.
export default {
  content: [
    './components/**/*.{vue,ts}',
    './layouts/**/*.vue',
    './pages/**/*.vue',
    './composables/**/*.ts',
    './app.vue',
    './error.vue',
    './utils/**/*.ts',
  ],
  theme: {
    extend: {
      fontFamily: {
        sans: ['"Space Grotesk"', 'ui-sans-serif', 'system-ui', 'sans-serif'],
        mono: ['ui-monospace', 'SFMono-Regular', 'Menlo', 'monospace'],
      },
      colors: {
        basalt: {
          50: '#f5f6f7', 100: '#e6e8eb', 200: '#cdd1d6', 300: '#a8afb8', 400: '#7b8491',
          500: '#5c6573', 600: '#47505d', 700: '#39404b', 800: '#262b33', 900: '#181b21', 950: '#0e1014',
        },
        regolith: {
          50: '#fdf6ef', 100: '#f9e8d6', 200: '#f2cda9', 300: '#e9ab73', 400: '#df8744',
          500: '#d16d27', 600: '#b4551d', 700: '#8f411b', 800: '#73361c', 900: '#5e2e1a',
        },
        ice: {
          50: '#effafb', 100: '#d6f1f4', 200: '#b2e3ea', 300: '#7ccfdb', 400: '#3fb1c4',
          500: '#2394a9', 600: '#1f778f', 700: '#206175', 800: '#225061', 900: '#204453',
        },
      },
    },
  },
  plugins: [],
} satisfies Config
