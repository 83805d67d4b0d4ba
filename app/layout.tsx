import type { Metadata, Viewport } from "next";
import { connection } from "next/server";
import type { ReactNode } from "react";
import { monoFont, uiFont } from "./fonts";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Slabwright", template: "%s · Slabwright" },
  icons: { icon: "/favicon.svg" },
  description: "Print-ready carrier slabs for multi-part 3D-printed kits: laid out, marked, checked, one watertight file.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Every page is rendered for its request, so Next.js can put that request's CSP nonce (proxy.ts)
  // on its scripts; a page prerendered at build time would carry none and be blocked.
  await connection();
  return (
    <html lang="en" className={`${uiFont.variable} ${monoFont.variable}`}>
      <body className="min-h-screen">{children}</body>
    </html>
  );
}
