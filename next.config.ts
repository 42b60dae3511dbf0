import type { NextConfig } from "next";
import { ACTION_BODY_LIMIT_BYTES } from "./lib/request-gate";

// Security headers and the method and body-size gate live in scripts/serve.ts, which serves every
// answer; see DEVELOPERS.md, "Security headers".

const nextConfig: NextConfig = {
  serverExternalPackages: ["pg", "@node-rs/argon2", "rate-limiter-flexible", "pg-boss", "nodemailer", "busboy", "pg-copy-streams"],
  poweredByHeader: false,
  turbopack: {
    resolveAlias: {
      fs: { browser: "./lib/empty-module.js" },
    },
  },
  experimental: {
    serverActions: { bodySizeLimit: ACTION_BODY_LIMIT_BYTES },
    // forbidden() for refused pages (403 with app/(app)/forbidden.tsx).
    authInterrupts: true,
  },
};

export default nextConfig;
