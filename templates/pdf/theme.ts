import path from 'node:path';

/** Ballast's identity in print: deep harbour ink, weathered brass, warm paper (as in src/styles.css). */
export const colours = {
  ink: '#17313a',
  ink800: '#1c3740',
  ink700: '#264650',
  ink500: '#4b6b75',
  ink300: '#86a3ab',
  ink200: '#b2c6cc',
  ink100: '#d8e3e6',
  ink50: '#eef3f4',
  brass: '#d39b3f',
  brass700: '#9a6b1f',
  brass300: '#e6c27f',
  brass100: '#f6ead3',
  paper: '#f7f4ee',
  kelp: '#3f8a6c',
  coral: '#c4523f',
  coral100: '#f7dfd9',
  line: '#d8e3e6',
  white: '#ffffff',
} as const;

const root = path.resolve(import.meta.dirname, '..', '..');

/** Where the .woff files of a @fontsource family live (woff, not woff2: fontkit handles it reliably). */
export function fontDir(
  family: 'manrope' | 'ibm-plex-mono' | 'noto-sans-hebrew' | 'noto-sans-arabic',
): string {
  return path.join(root, 'node_modules', '@fontsource', family, 'files');
}
