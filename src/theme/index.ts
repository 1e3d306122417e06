import { darkTheme, type GlobalTheme, type GlobalThemeOverrides } from 'naive-ui';

/** The palette as values, for places that cannot read CSS variables (naive-ui overrides, echarts). */
export const palette = {
  light: {
    paper: '#f6f4ef',
    surface: '#fcfbf8',
    sunken: '#eeebe3',
    ink: '#141a26',
    ink2: '#4f5666',
    ink3: '#7d8391',
    line: '#dcd7cb',
    lineStrong: '#c6c0b1',
    teal: '#1f7a74',
    tealHover: '#17635e',
    tealPressed: '#124e4a',
    tealSoft: '#e0eeeb',
    amber: '#d99a2b',
    danger: '#b2432f',
  },
  dark: {
    paper: '#141a26',
    surface: '#1a2130',
    sunken: '#10151f',
    ink: '#ece9e2',
    ink2: '#b2b6bf',
    ink3: '#868c99',
    line: '#2b3344',
    lineStrong: '#3a4457',
    teal: '#4aa79f',
    tealHover: '#62bab2',
    tealPressed: '#3a8a83',
    tealSoft: '#1b3533',
    amber: '#e2aa45',
    danger: '#e0806c',
  },
} as const;

export type ThemeMode = keyof typeof palette;
export type Palette = (typeof palette)[ThemeMode];

const fontSans = "'IBM Plex Sans', system-ui, sans-serif";
const fontMono = "'IBM Plex Mono', ui-monospace, monospace";

function overrides(p: Palette, mode: ThemeMode): GlobalThemeOverrides {
  return {
    common: {
      fontFamily: fontSans,
      fontFamilyMono: fontMono,
      fontSize: '14px',
      fontSizeMedium: '14px',
      borderRadius: '6px',
      borderRadiusSmall: '4px',
      primaryColor: p.teal,
      primaryColorHover: p.tealHover,
      primaryColorPressed: p.tealPressed,
      primaryColorSuppl: p.teal,
      infoColor: p.teal,
      infoColorHover: p.tealHover,
      infoColorPressed: p.tealPressed,
      infoColorSuppl: p.teal,
      warningColor: p.amber,
      warningColorHover: p.amber,
      warningColorPressed: p.amber,
      warningColorSuppl: p.amber,
      errorColor: p.danger,
      errorColorHover: p.danger,
      errorColorPressed: p.danger,
      errorColorSuppl: p.danger,
      textColorBase: p.ink,
      textColor1: p.ink,
      textColor2: p.ink,
      textColor3: p.ink3,
      placeholderColor: p.ink3,
      bodyColor: p.paper,
      cardColor: p.surface,
      modalColor: p.surface,
      popoverColor: p.surface,
      tableColor: p.surface,
      tableHeaderColor: p.sunken,
      inputColor: mode === 'light' ? '#ffffff' : p.sunken,
      borderColor: p.lineStrong,
      dividerColor: p.line,
      hoverColor: mode === 'light' ? 'rgba(20,26,38,0.05)' : 'rgba(236,233,226,0.07)',
    },
    Button: {
      fontWeight: '500',
    },
    Card: {
      borderColor: p.line,
    },
    DataTable: {
      thColor: p.sunken,
      tdColor: p.surface,
      borderColor: p.line,
      thFontWeight: '500',
    },
    Form: {
      labelTextColor: p.ink2,
      feedbackTextColorError: p.danger,
      // naive-ui pads a shown message only above, so it sat right against the next field's label.
      feedbackPadding: '4px 0 10px 2px',
    },
    Tag: {
      borderRadius: '999px',
    },
  };
}

export const lightOverrides = overrides(palette.light, 'light');
export const darkOverrides = overrides(palette.dark, 'dark');

export function themeFor(mode: ThemeMode): { theme: GlobalTheme | null; overrides: GlobalThemeOverrides } {
  return mode === 'dark' ? { theme: darkTheme, overrides: darkOverrides } : { theme: null, overrides: lightOverrides };
}
