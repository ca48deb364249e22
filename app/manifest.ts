import type { MetadataRoute } from "next";

// The web app manifest (W3C Web Application Manifest): a phone adds Liftline to its home screen
// and opens it full screen on the board. Icons are Liftline's own (public/icons).
export default function manifest(): MetadataRoute.Manifest {
  return {
    id: "/",
    name: "Liftline",
    short_name: "Liftline",
    description: "Live chilled-water plant status, early warnings and on-call alarms.",
    start_url: "/",
    scope: "/",
    display: "standalone",
    orientation: "portrait",
    background_color: "#0f2a44",
    theme_color: "#0f2a44",
    icons: [
      { src: "/icons/icon-192.png", sizes: "192x192", type: "image/png", purpose: "any" },
      { src: "/icons/icon-512.png", sizes: "512x512", type: "image/png", purpose: "any" },
      { src: "/icons/icon-maskable-512.png", sizes: "512x512", type: "image/png", purpose: "maskable" },
      { src: "/icons/icon.svg", sizes: "any", type: "image/svg+xml", purpose: "any" },
    ],
  };
}
