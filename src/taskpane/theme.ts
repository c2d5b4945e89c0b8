/** Which Fluent theme the pane uses: `?theme=dark|light` wins, else Office's theme, else light. */
import { webDarkTheme, webLightTheme, type Theme } from '@fluentui/react-components';

export type ThemeName = 'light' | 'dark';

/** Relative luminance of a #rrggbb colour, 0..1 (WCAG 2.x formula). */
export function luminance(hex: string): number | null {
  const m = /^#?([0-9a-f]{6})$/i.exec(hex.trim());
  if (!m) return null;
  const n = parseInt(m[1], 16);
  const ch = [(n >> 16) & 255, (n >> 8) & 255, n & 255].map((c) => {
    const v = c / 255;
    return v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
  });
  return 0.2126 * ch[0] + 0.7152 * ch[1] + 0.0722 * ch[2];
}

export function pickTheme(search: string, officeBackground: string | null | undefined): ThemeName {
  const q = new URLSearchParams(search).get('theme');
  if (q === 'dark' || q === 'light') return q;
  if (officeBackground) {
    const l = luminance(officeBackground);
    if (l !== null) return l < 0.4 ? 'dark' : 'light';
  }
  return 'light';
}

export function fluentTheme(name: ThemeName): Theme {
  return name === 'dark' ? webDarkTheme : webLightTheme;
}
