import { cssVar } from '../../composables/useThemeMode';

/** The page's ink and paper for charts, read from the palette's CSS variables (src/styles/palette.css). */
export interface InkColours {
  ink: string;
  ink2: string;
  ink3: string;
  line: string;
  surface: string;
}

export function inkColours(theme: 'light' | 'dark'): InkColours {
  const dark = theme === 'dark';
  return {
    ink: cssVar('--c-ink') || (dark ? '#ece9e2' : '#141a26'),
    ink2: cssVar('--c-ink-2') || '#4f5666',
    ink3: cssVar('--c-ink-3') || '#7d8391',
    line: cssVar('--c-line') || '#dcd7cb',
    surface: cssVar('--c-surface') || '#fcfbf8',
  };
}
