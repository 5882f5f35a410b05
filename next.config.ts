import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // Parallel test instances build into their own folders (see DEVELOPERS.md).
  distDir: process.env.NEXT_DIST_DIR ?? ".next",
  // Server-only packages that must not be bundled (native-ish or large CJS).
  serverExternalPackages: ["pg", "pg-boss", "nodemailer", "wavefile"],
  poweredByHeader: false,
  typedRoutes: false,
  experimental: {
    serverActions: { bodySizeLimit: "2mb" },
  },
};

export default nextConfig;
