import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import { connection } from "next/server";
import { Providers } from "@/components/providers";
import "./globals.css";

const inter = localFont({
  src: "./fonts/inter-latin-wght-normal.woff2",
  variable: "--font-inter",
  display: "swap",
  weight: "100 900",
});

export const metadata: Metadata = {
  title: { default: "Cyclegate", template: "%s · Cyclegate" },
  description: "Program vault and pre-run checker for the machine shop.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Every page, the not-found page included, renders per request, so its scripts carry the nonce of
  // that answer's Content-Security-Policy (scripts/serve.ts); a page prerendered at build time would
  // carry none, and the browser would refuse its scripts.
  await connection();
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-dvh font-sans antialiased">
        <Providers>{children}</Providers>
      </body>
    </html>
  );
}
