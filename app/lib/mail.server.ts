import nodemailer from "nodemailer";
import { getEnv } from "./env.server";

/**
 * Sends e-mail over SMTP: to SMTP_URL when it is set (a real provider), otherwise to the local
 * fake SMTP server (fake-smtp.server.ts) on 127.0.0.1:FAKE_SMTP_PORT, which keeps each message
 * as an .eml file for the outbox page.
 */
function createTransport() {
  const env = getEnv();
  if (env.SMTP_URL) return nodemailer.createTransport(env.SMTP_URL);
  // The fake has no TLS: smtp-server's bundled certificate is expired (docs/stack-notes.md).
  return nodemailer.createTransport({
    host: "127.0.0.1",
    port: env.FAKE_SMTP_PORT,
    secure: false,
    ignoreTLS: true,
  });
}

let transport: ReturnType<typeof createTransport> | undefined;

export interface Mail {
  to: string;
  subject: string;
  text: string;
}

export async function sendMail(mail: Mail): Promise<void> {
  transport ??= createTransport();
  await transport.sendMail({ from: getEnv().MAIL_FROM, ...mail });
}

/** True when mail goes to the local fake, so the outbox page may show it. */
export function usingFakeMail(): boolean {
  return !getEnv().SMTP_URL;
}
