/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  // Tests that run the server in development mode give each instance its own build folder,
  // since two dev servers may not share one.
  distDir: process.env.LIFTLINE_DIST_DIR || ".next",
  poweredByHeader: false,
  // Native and Node-only packages stay out of the bundles and load from node_modules.
  serverExternalPackages: [
    "better-sqlite3",
    "aedes",
    "mqtt",
    "bcryptjs",
    "nodemailer",
    "smtp-server",
    "sparkplug-payload",
    "pdfkit",
  ],
  // `npm test` type-checks the whole project with tsc; the build need not do it twice. Tests
  // running development servers point Next at a tsconfig of their own (tests/helpers/server.ts).
  typescript: { ignoreBuildErrors: true, tsconfigPath: process.env.LIFTLINE_TSCONFIG || "tsconfig.json" },
};

export default nextConfig;
