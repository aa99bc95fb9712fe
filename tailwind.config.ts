import type { Config } from 'tailwindcss';

/**
 * Crowntip's own palette and type, loaded by Tailwind v4 through `@config` in
 * client/styles/*.css. The token names are ours. Roles: loam (text, the dark header), mist (pale
 * grounds), shoot (green: primary actions and good outcomes only), dusk (slate blue: the accent
 * for active tabs, links, the mark on dark grounds, banners, cautions and review flags), clay
 * (errors, refusals, "below"), sky (information and the focus ring).
 * Every text/background pair the styles use is checked against WCAG 2.2 AA in
 * tests/client/theme-contrast.test.ts (4.5:1 text, 3:1 large text and UI components).
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

// The accent: a slate blue for active tabs, the mark on dark headers, banners and cautions.
// Green (shoot) is kept for primary actions and good outcomes; clay for errors and refusals.
const dusk = {
  DEFAULT: '#4a5689',
  50: '#f2f4f9',
  100: '#e2e6f1',
  200: '#c6cde4',
  300: '#a2add2',
  400: '#7d8abd',
  500: '#5d6ba3',
  600: '#4a5689',
  700: '#3c4670',
  800: '#2e3656',
  900: '#20263d',
};

// The phone app's classes (client/) still say `straw`, the old accent's name: they get the
// accent, with the light tint as DEFAULT (a mark or a fill on the dark header, a banner ground
// under loam text), as straw's DEFAULT was light.
const straw = { ...dusk, DEFAULT: dusk[300] };

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
      colors: { loam, shoot, dusk, straw, clay, mist, sky },
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
