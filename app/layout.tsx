import type { Metadata, Viewport } from "next";
import localFont from "next/font/local";
import "./globals.css";

// Shipped in fonts/ (SIL Open Font License); nothing is fetched at build or run time.
const inter = localFont({
  src: "../fonts/inter-latin-wght-normal.woff2",
  variable: "--font-inter",
  display: "swap",
  weight: "100 900",
});

export const metadata: Metadata = {
  title: { default: "Zonewright", template: "%s · Zonewright" },
  description: "Zone audio configuration for home-technology integrators and their clients.",
};

export const viewport: Viewport = { width: "device-width", initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
