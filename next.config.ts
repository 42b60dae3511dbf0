import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  serverExternalPackages: ["pg", "@node-rs/argon2", "pg-boss", "nodemailer", "busboy"],
  poweredByHeader: false,
  turbopack: {
    resolveAlias: {
      fs: { browser: "./lib/empty-module.js" },
    },
  },
  experimental: {
    serverActions: { bodySizeLimit: "1mb" },
  },
};

export default nextConfig;
