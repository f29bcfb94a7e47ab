import type { Config } from 'tailwindcss'

// Hoopwise's own look: ink on sand, a salt-marsh green for actions, amber for attention, brick for refusals.
// Every text pairing used here meets WCAG 2.2 AA (4.5:1); tests/unit/contrast.test.ts holds them to it.
export default {
  content: [],
  theme: {
    extend: {
      fontFamily: { sans: ['"Work Sans"', 'system-ui', 'sans-serif'] },
      colors: {
        ink: { DEFAULT: '#16211f', soft: '#3d4a47', muted: '#56625f' },
        sand: { DEFAULT: '#f6f3ea', deep: '#ebe5d5', line: '#cfc6ae' },
        marsh: { 50: '#e7f0ec', 100: '#cfe2d9', 600: '#2b6f5d', 700: '#1f5a4b', 800: '#17443a' },
        tide: { 50: '#e8eef5', 700: '#2c4f78' },
        amber: { 50: '#fff4d9', 800: '#7a4d00' },
        brick: { 50: '#fbe9e5', 700: '#9d2e1b' },
      },
    },
  },
  plugins: [],
} satisfies Config
