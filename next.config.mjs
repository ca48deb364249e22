/** @type {import('next').NextConfig} */
const nextConfig = {
  reactStrictMode: true,
  poweredByHeader: false,
  // Native and Node-only packages stay out of the bundles and load from node_modules.
  serverExternalPackages: ["better-sqlite3", "aedes", "mqtt", "bcryptjs", "nodemailer", "smtp-server", "sparkplug-payload"],
  typescript: { ignoreBuildErrors: false },
};

export default nextConfig;
