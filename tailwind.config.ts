import type { Config } from 'tailwindcss';

/**
 * Crowntip's own palette and type, loaded by Tailwind v4 through `@config` in
 * client/styles/*.css. The token names are ours; contrast pairs we rely on
 * (WCAG 2.x ratios, checked when the palette was chosen):
 *   white on shoot (700) 7.6 · white on clay (600) 6.4 · white on sky (600) 7.2
 *   loam (900) on straw (400) 8.9 · loam on mist 14.6 · loam-500 on white 5.6
 *   clay-600 on mist 5.7 · loam-400 input border on white 3.4 (non-text, ≥ 3)
 * Straw is an accent for fills and borders only: never straw text on a light ground.
 */
const loam = {
  DEFAULT: '#23201a',
  50: '#f7f6f2',
  100: '#ebe8e0',
  200: '#d6d1c4',
  300: '#b8b0a0',
  400: '#958b78',
  500: '#6f6757',
  600: '#564f42',
  700: '#413b31',
  800: '#2f2b24',
  900: '#23201a',
};

const shoot = {
  DEFAULT: '#1f5f36',
  50: '#eef7f1',
  100: '#d6ecdd',
  200: '#afd8bd',
  300: '#7fbd95',
  400: '#4f9d6b',
  500: '#2f804f',
  600: '#236b3f',
  700: '#1f5f36',
  800: '#184a2b',
  900: '#10331e',
};

const straw = {
  DEFAULT: '#e9b949',
  50: '#fdf8ea',
  100: '#faedc8',
  200: '#f5dc95',
  300: '#efca68',
  400: '#e9b949',
  500: '#d49d2a',
  600: '#b07d1d',
  700: '#8a5f18',
  800: '#6a4816',
  900: '#4d3512',
};

const clay = {
  DEFAULT: '#a63d1f',
  50: '#fbf1ed',
  100: '#f6dcd2',
  200: '#edb7a4',
  300: '#e08d72',
  400: '#cc6546',
  500: '#b94d2c',
  600: '#a63d1f',
  700: '#8a321a',
  800: '#6b2816',
  900: '#4d1d10',
};

// Pale grounds only; a full scale would invite low-contrast text.
const mist = {
  DEFAULT: '#f5f3ec',
  50: '#fbfaf6',
  100: '#f5f3ec',
  200: '#ebe7da',
  300: '#ddd7c4',
};

// Replaces Tailwind's default `sky` scale on purpose: `sky-*` means Crowntip's info blue.
const sky = {
  DEFAULT: '#1d5b8c',
  50: '#eef5fb',
  100: '#d6e7f5',
  200: '#aecfea',
  300: '#7eb1da',
  400: '#4f8fc4',
  500: '#2f74ab',
  600: '#1d5b8c',
  700: '#184b73',
  800: '#133a59',
  900: '#0d2940',
};

export default {
  theme: {
    extend: {
      colors: { loam, shoot, straw, clay, mist, sky },
      fontFamily: {
        sans: [
          'Lato',
          'system-ui',
          '-apple-system',
          'Segoe UI',
          'Roboto',
          'Helvetica Neue',
          'Arial',
          'sans-serif',
        ],
      },
      // Minimum touch target for the sampler's phone (gloves, sunlight): 48 px.
      minHeight: { touch: '48px' },
      minWidth: { touch: '48px' },
    },
  },
} satisfies Config;
