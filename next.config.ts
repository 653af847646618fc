import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // Native and heavy server packages stay outside the server bundle.
  serverExternalPackages: ["@napi-rs/canvas", "sharp", "pdfjs-dist", "@node-rs/argon2", "bullmq", "ioredis", "mysql2", "formidable"],
  poweredByHeader: false,
};

export default nextConfig;
