import type { Metadata } from 'next';
import localFont from 'next/font/local';
import Link from 'next/link';
import { headers } from 'next/headers';
import { SiteHeader } from '@/components/SiteHeader';
import './globals.css';

// Fonts ship with the app (SIL OFL, licences beside the files); nothing is fetched at build time.
const manrope = localFont({ src: './fonts/manrope-latin-wght.woff2', variable: '--font-manrope', weight: '200 800', display: 'swap' });
const jetbrains = localFont({
  src: [
    { path: './fonts/jetbrains-mono-latin-400.woff2', weight: '400' },
    { path: './fonts/jetbrains-mono-latin-600.woff2', weight: '600' },
  ],
  variable: '--font-jetbrains',
  display: 'swap',
});

export const metadata: Metadata = {
  title: { default: 'Hotlap', template: '%s · Hotlap' },
  description: 'Speed-with-quality 3D-print contests with inspected G-code.',
  icons: { icon: '/favicon.svg' },
};

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // proxy.ts puts a fresh nonce into the request's Content-Security-Policy; Next.js adds it to its
  // own scripts. Reading the request headers here renders every page per request, which a nonce
  // needs (a page built ahead of time would carry a stale nonce and its scripts would be blocked).
  await headers();
  return (
    <html lang="en" className={`${manrope.variable} ${jetbrains.variable}`}>
      <body>
        <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:rounded focus:bg-white focus:p-2">
          Skip to content
        </a>
        <SiteHeader />
        {/* Client data providers (TanStack Query, nuqs) are mounted by the components that use them (components/Providers.tsx), so other pages do not load them. */}
        <main id="main" className="mx-auto max-w-6xl px-4 py-8">{children}</main>
        <footer className="mx-auto max-w-6xl px-4 pb-10 text-sm text-ink-500">
          Fast printing means hot parts and fumes: read the <Link href="/safety">safety notes</Link> before a timed print.
        </footer>
      </body>
    </html>
  );
}
