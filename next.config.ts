import type { NextConfig } from "next";

const dev = process.env.NODE_ENV === "development";

/*
 * Next injects inline scripts (hydration data) and inline styles without nonces unless every
 * page renders dynamically behind a proxy that mints one; 'unsafe-inline' is the price of
 * static pages. The development server evaluates modules with eval() for fast refresh.
 * Blob and data URLs carry chart downloads (SVG to PNG) and next/font's inlined fonts.
 */
const contentSecurityPolicy = [
  "default-src 'self'",
  `script-src 'self' 'unsafe-inline'${dev ? " 'unsafe-eval'" : ""}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  `connect-src 'self'${dev ? " ws: wss:" : ""}`,
  "object-src 'none'",
  "base-uri 'self'",
  "form-action 'self'",
  "frame-ancestors 'none'",
].join("; ");

/** Sent with every response, pages and route handlers alike. */
const securityHeaders = [
  { key: "Content-Security-Policy", value: contentSecurityPolicy },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=()" },
  { key: "Cross-Origin-Opener-Policy", value: "same-origin" },
];

const nextConfig: NextConfig = {
  // knex pulls optional drivers (sqlite3, tedious) that the bundler cannot resolve.
  serverExternalPackages: ["knex", "mysql2", "@node-rs/argon2", "smtp-server", "nodemailer"],
  poweredByHeader: false,
  async headers() {
    return [{ source: "/:path*", headers: securityHeaders }];
  },
};

export default nextConfig;
