import type { Metadata, Viewport } from "next";
import { cookies } from "next/headers";
import { connection } from "next/server";
import { parseThemeChoice, themeAttribute, THEME_COOKIE } from "@/lib/theme";
import "@fontsource/inter/400.css";
import "@fontsource/inter/600.css";
import "./globals.css";

export const metadata: Metadata = {
  title: { default: "Liftline", template: "%s · Liftline" },
  description: "Live chilled-water plant status and early warnings for service technicians.",
  appleWebApp: { capable: true, title: "Liftline", statusBarStyle: "black-translucent" },
  // Naming icons here replaces the file-based app/icon.svg link, so the page icon is named too.
  icons: { icon: { url: "/icon.svg", type: "image/svg+xml" }, apple: "/icons/apple-touch-icon.png" },
};

export const viewport: Viewport = {
  width: "device-width",
  initialScale: 1,
  themeColor: [
    { media: "(prefers-color-scheme: light)", color: "#0f2a44" },
    { media: "(prefers-color-scheme: dark)", color: "#121417" },
  ],
};

export default async function RootLayout({ children }: { children: React.ReactNode }) {
  // Rendered per request, so the scripts carry that response's CSP nonce (lib/server/security-headers.ts).
  await connection();
  // The theme is chosen on the server from the cookie, so the first paint is already right (no script, no flash).
  const theme = themeAttribute(parseThemeChoice((await cookies()).get(THEME_COOKIE)?.value));
  return (
    <html lang="en" data-theme={theme}>
      <body className="min-h-screen bg-surface text-ink antialiased">{children}</body>
    </html>
  );
}
