import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // knex pulls optional drivers (sqlite3, tedious) that the bundler cannot resolve.
  serverExternalPackages: ["knex", "mysql2", "@node-rs/argon2", "smtp-server", "nodemailer"],
  poweredByHeader: false,
};

export default nextConfig;
