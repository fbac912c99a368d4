import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import { connection } from "next/server";
import { RegisterServiceWorker } from "@/components/pwa/register-service-worker";
import "./globals.css";

// Atkinson Hyperlegible (SIL OFL 1.1, shipped in app/fonts): clear digits for a glance in a dim shed.
const atkinson = localFont({
  src: [
    { path: "./fonts/atkinson-hyperlegible-latin-400-normal.woff2", weight: "400", style: "normal" },
    { path: "./fonts/atkinson-hyperlegible-latin-700-normal.woff2", weight: "700", style: "normal" },
  ],
  variable: "--font-atkinson",
  display: "swap",
});

export const metadata: Metadata = {
  title: { default: "Wormward", template: "%s · Wormward" },
  description: "Watches your worm bins: temperature, moisture and ammonia by zone, with alerts to your phone.",
  manifest: "/manifest.webmanifest",
  icons: { icon: "/icon.svg", apple: "/icon-192.png" },
};

// The browser's bar takes the header's colour, light theme and dark (app/globals.css).
export const viewport: Viewport = {
  themeColor: [
    { media: "(prefers-color-scheme: light)", color: "#3f2e22" },
    { media: "(prefers-color-scheme: dark)", color: "#32261d" },
  ],
  width: "device-width",
  initialScale: 1,
};

// Every page renders per request: Next puts the request's CSP nonce (proxy.ts) on its scripts only
// then; a page built ahead would carry scripts the policy refuses.
export default async function RootLayout({ children }: { children: React.ReactNode }) {
  await connection();
  return (
    <html lang="en" className={atkinson.variable}>
      <body className="min-h-dvh font-sans antialiased">
        {children}
        <RegisterServiceWorker />
      </body>
    </html>
  );
}
