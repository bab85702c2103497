import type { Metadata, Viewport } from "next";
import type { ReactNode } from "react";
import { ToastProvider } from "@/components/ui/toast";
import { serialFont, textFont } from "./fonts";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Twinleaf", template: "%s · Twinleaf" },
  description: "The register of matched loudspeaker pairs.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en" className={`${textFont.variable} ${serialFont.variable}`}>
      <body className="min-h-screen">
        <ToastProvider>{children}</ToastProvider>
      </body>
    </html>
  );
}
