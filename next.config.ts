import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // Tests build into their own directory so a test run never replaces the demo's build.
  distDir: process.env.NEXT_DIST_DIR ?? ".next",
  // Native and heavy server packages stay outside the server bundle.
  serverExternalPackages: ["@napi-rs/canvas", "sharp", "pdfjs-dist", "@node-rs/argon2", "bullmq", "ioredis", "mysql2", "formidable"],
  poweredByHeader: false,
  // forbidden() from next/navigation: a role without access to a page gets a 403 page, not a 200.
  experimental: { authInterrupts: true },
  // The test runner builds only to drive the browser tests; type checking is `npm run typecheck`'s job there.
  typescript: { ignoreBuildErrors: process.env.TYMPAN_BUILD_SKIP_TYPECHECK === "1" },
};

export default nextConfig;
