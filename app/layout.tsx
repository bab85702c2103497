import type { Metadata, Viewport } from "next";
import { connection } from "next/server";
import type { ReactNode } from "react";
import { ToastProvider } from "@/components/ui/toast";
import { serialFont, textFont } from "./fonts";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Twinleaf", template: "%s · Twinleaf" },
  description: "The register of matched loudspeaker pairs.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default async function RootLayout({ children }: { children: ReactNode }) {
  // Every page is rendered for its request, so that Next can put the request's CSP nonce (proxy.ts)
  // on its scripts; a page built ahead of time would carry none and its scripts would be refused.
  await connection();
  return (
    <html lang="en" className={`${textFont.variable} ${serialFont.variable}`}>
      <body className="min-h-screen">
        <ToastProvider>{children}</ToastProvider>
      </body>
    </html>
  );
}
