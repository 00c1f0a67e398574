/**
 * Vuetify with Ebullio's own look: "ebullioLight" (warm paper, slate ink, kettle copper) and
 * "ebullioDark" (charcoal with the same copper). Components are auto-imported by
 * vite-plugin-vuetify, so only what the templates use reaches the bundle.
 */
import 'vuetify/styles';
import { createVuetify, type ThemeDefinition } from 'vuetify';
import { aliases } from 'vuetify/iconsets/mdi-svg';
import { ebullioIcons } from './icons.js';

export const ebullioLight: ThemeDefinition = {
  dark: false,
  colors: {
    background: '#F6F2EC',
    surface: '#FFFDF9',
    'surface-variant': '#E7E0D6',
    'on-surface-variant': '#3A3530',
    primary: '#B5541F',
    'on-primary': '#FFFFFF',
    secondary: '#2F4858',
    'on-secondary': '#FFFFFF',
    info: '#3B6E8F',
    success: '#4E7D3A',
    warning: '#B7791F',
    error: '#B3261E',
  },
};

export const ebullioDark: ThemeDefinition = {
  dark: true,
  colors: {
    background: '#14191C',
    surface: '#1D2428',
    'surface-variant': '#33403F',
    'on-surface-variant': '#E3DCD2',
    primary: '#E08A55',
    'on-primary': '#241208',
    secondary: '#8FB3C6',
    'on-secondary': '#0F1E26',
    info: '#7FB0D0',
    success: '#8FC27A',
    warning: '#E5B45C',
    error: '#F2B8B5',
  },
};

export const THEME_STORAGE_KEY = 'ebullio.theme';

function initialTheme(): 'ebullioLight' | 'ebullioDark' {
  try {
    const stored = globalThis.localStorage?.getItem(THEME_STORAGE_KEY);
    if (stored === 'ebullioLight' || stored === 'ebullioDark') return stored;
  } catch {
    // storage unavailable (private mode): fall back to the system preference
  }
  return globalThis.matchMedia?.('(prefers-color-scheme: dark)').matches ? 'ebullioDark' : 'ebullioLight';
}

export function createEbullioVuetify() {
  return createVuetify({
    theme: {
      defaultTheme: initialTheme(),
      themes: { ebullioLight, ebullioDark },
    },
    icons: { defaultSet: 'ebullio', aliases, sets: { ebullio: ebullioIcons } },
    defaults: {
      VCard: { rounded: 'lg' },
      VBtn: { rounded: 'lg' },
      VTextField: { variant: 'outlined', density: 'comfortable' },
      VSelect: { variant: 'outlined', density: 'comfortable' },
      VAutocomplete: { variant: 'outlined', density: 'comfortable' },
      VTextarea: { variant: 'outlined', density: 'comfortable' },
      // On a phone a table row becomes a card of label–value lines instead of a strip scrolled
      // sideways (Vuetify's mobile rows, below the sm breakpoint: 600 px).
      VDataTable: { mobileBreakpoint: 'sm' },
      VDataTableServer: { mobileBreakpoint: 'sm' },
    },
  });
}
