import type { Metadata } from 'next';
import { headers } from 'next/headers';
import { mono, monoGreek, sans, sansGreek } from './fonts';
import { Providers } from './providers';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Anodyne', template: '%s · Anodyne' },
  description: 'Design, check and sign off vacuum-tube amplifier stages.',
  icons: { icon: [{ url: '/favicon.ico', sizes: '16x16 32x32 48x48' }, { url: '/icon.svg', type: 'image/svg+xml' }] },
};

// Reading the request's CSP nonce makes every page render per request, which a nonce needs.
export default async function RootLayout({ children }: { children: React.ReactNode }) {
  const nonce = (await headers()).get('x-nonce') ?? undefined;
  return (
    <html lang="en" suppressHydrationWarning className={`${sans.variable} ${sansGreek.variable} ${mono.variable} ${monoGreek.variable}`}>
      <body className="min-h-screen font-sans antialiased">
        <Providers nonce={nonce}>{children}</Providers>
      </body>
    </html>
  );
}
