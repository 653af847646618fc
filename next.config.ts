import type { NextConfig } from "next";

const https = (process.env.APP_URL ?? "").startsWith("https://");

/** On every response. Pages get their content security policy (with a nonce) from proxy.ts. */
const everywhere = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=()" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
  ...(https ? [{ key: "Strict-Transport-Security", value: "max-age=31536000; includeSubDomains" }] : []),
];
/** API answers and static files are never documents: nothing in them may run or be framed. */
const noDocument = [{ key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'" }];

const nextConfig: NextConfig = {
  // Tests build into their own directory so a test run never replaces the demo's build.
  distDir: process.env.NEXT_DIST_DIR ?? ".next",
  // Native and heavy server packages stay outside the server bundle.
  serverExternalPackages: ["@napi-rs/canvas", "sharp", "pdfjs-dist", "@node-rs/argon2", "bullmq", "ioredis", "mysql2", "formidable"],
  poweredByHeader: false,
  async headers() {
    return [
      { source: "/:path*", headers: everywhere },
      { source: "/api/:path*", headers: noDocument },
      { source: "/_next/static/:path*", headers: noDocument },
    ];
  },
  // forbidden() from next/navigation: a role without access to a page gets a 403 page, not a 200.
  experimental: { authInterrupts: true },
  // The test runner builds only to drive the browser tests; type checking is `npm run typecheck`'s job there.
  typescript: { ignoreBuildErrors: process.env.TYMPAN_BUILD_SKIP_TYPECHECK === "1" },
};

export default nextConfig;
