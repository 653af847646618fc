import type { Metadata } from "next";
import localFont from "next/font/local";
import "./globals.css";

// Shipped with the app (no font download at build or run time).
const inter = localFont({
  src: "../node_modules/@fontsource-variable/inter/files/inter-latin-wght-normal.woff2",
  variable: "--font-inter",
  weight: "100 900",
  display: "swap",
});

export const metadata: Metadata = {
  title: { default: "Tympan", template: "%s · Tympan" },
  description: "Press-sheet inspection against approved artwork.",
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
