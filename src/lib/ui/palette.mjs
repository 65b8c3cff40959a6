/** Ebbwatch's own palette: ink-navy and sea-glass; coral below band, violet (iris) above, sea-glass in band.
 * One source for Tailwind (tailwind.config.mjs) and the contrast checks (contrast.test.ts). */
export const palette = {
  ink: {
    50: '#f2f5f9', 100: '#e1e7f0', 200: '#c3cfe0', 300: '#97aac6', 400: '#6580a6',
    500: '#46628a', 600: '#344c6f', 700: '#283b58', 800: '#1b2a41', 900: '#121d2f', 950: '#0a111d',
  },
  glass: {
    50: '#effaf7', 100: '#d6f2ea', 200: '#aee4d6', 300: '#7fd0bd', 400: '#55b8a3',
    500: '#3b9c88', 600: '#2e7d6e', 700: '#28645a', 800: '#22504a', 900: '#1d423d',
  },
  coral: {
    50: '#fff3f0', 100: '#ffe2db', 200: '#ffc4b7', 300: '#ff9d88', 400: '#f97459',
    500: '#e8553a', 600: '#c73f27', 700: '#a3321f', 800: '#852c1e', 900: '#6d281d',
  },
  iris: {
    50: '#f5f3ff', 100: '#ebe6fe', 200: '#d8cffd', 300: '#bba9f9', 400: '#9b7bf3',
    500: '#8057e9', 600: '#6f3cd8', 700: '#5d30b6', 800: '#4d2a94', 900: '#402577',
  },
  amberline: { 100: '#fdf1d6', 400: '#e9b33f', 700: '#8a5a08' },
};
