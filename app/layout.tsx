import type { Metadata } from 'next';
import { mono, monoGreek, sans, sansGreek } from './fonts';
import { Providers } from './providers';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Anodyne', template: '%s · Anodyne' },
  description: 'Design, check and sign off vacuum-tube amplifier stages.',
  icons: { icon: [{ url: '/favicon.ico', sizes: '16x16 32x32 48x48' }, { url: '/icon.svg', type: 'image/svg+xml' }] },
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" suppressHydrationWarning className={`${sans.variable} ${sansGreek.variable} ${mono.variable} ${monoGreek.variable}`}>
      <body className="min-h-screen font-sans antialiased">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
