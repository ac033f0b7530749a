import "server-only";
import nodemailer, { type Transporter } from "nodemailer";
import type SMTPTransport from "nodemailer/lib/smtp-transport";
import { env } from "@/lib/env";

/** SMTP settings from the environment: the local catcher unless SMTP_HOST is set. */
export function smtpOptions(): SMTPTransport.Options {
  return {
    host: env.SMTP_HOST,
    port: env.SMTP_PORT,
    secure: env.SMTP_SECURE,
    // The catcher speaks plain SMTP on loopback; real servers get STARTTLS when they offer it.
    ignoreTLS: env.MAIL_CATCHER,
    ...(env.SMTP_USER ? { auth: { user: env.SMTP_USER, pass: env.SMTP_PASS ?? "" } } : {}),
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  };
}

const globalForMail = globalThis as unknown as { gloamingMailTransport?: Transporter<SMTPTransport.SentMessageInfo> };

/** The process's SMTP transport (created on first use). */
export function mailTransport(): Transporter<SMTPTransport.SentMessageInfo> {
  globalForMail.gloamingMailTransport ??= nodemailer.createTransport(smtpOptions());
  return globalForMail.gloamingMailTransport;
}

/** Absolute link into the app for mail bodies, e.g. appLink("/team"). */
export function appLink(pathname: string): string {
  return new URL(pathname, env.APP_URL).toString();
}
