import type { Metadata } from "next";
import { Caution } from "./_components/Caution.tsx";
import { TopBar } from "./_components/TopBar.tsx";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Epochal", template: "%s · Epochal" },
  description: "Strain monitoring from survey epochs",
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en">
      <body>
        <a className="skip" href="#main">Skip to content</a>
        <TopBar />
        <Caution />
        {children}
      </body>
    </html>
  );
}
