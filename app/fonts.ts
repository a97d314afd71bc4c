import localFont from 'next/font/local';

export const sans = localFont({ src: './fonts/inter-latin-wght-normal.woff2', variable: '--font-sans', weight: '100 900', display: 'swap' });
export const sansGreek = localFont({
  src: './fonts/inter-greek-wght-normal.woff2',
  variable: '--font-sans-greek',
  weight: '100 900',
  display: 'swap',
  declarations: [{ prop: 'unicode-range', value: 'U+0370-03FF, U+2126' }],
});
export const mono = localFont({ src: './fonts/jetbrains-mono-latin-wght-normal.woff2', variable: '--font-mono', weight: '100 800', display: 'swap' });
export const monoGreek = localFont({
  src: './fonts/jetbrains-mono-greek-wght-normal.woff2',
  variable: '--font-mono-greek',
  weight: '100 800',
  display: 'swap',
  declarations: [{ prop: 'unicode-range', value: 'U+0370-03FF, U+2126' }],
});
