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

/** What a message is, for the outbox: a reset link belongs to its addressee alone. */
export type MailKind = "invitation" | "share" | "mention" | "reset" | "signoff";

export interface Mail {
  to: string;
  subject: string;
  text: string;
  kind: MailKind;
  /** The team that sent it (null for a password reset, which belongs to no team). */
  teamId: number | null;
}

/** Headers the fake SMTP server keeps, so the outbox shows each team only its own mail. */
export const MAIL_KIND_HEADER = "x-twistlog-kind";
export const MAIL_TEAM_HEADER = "x-twistlog-team";

export async function sendMail({ kind, teamId, ...mail }: Mail): Promise<void> {
  transport ??= createTransport();
  // Only the local fake gets the labels: a real provider's recipients need no internal ids.
  const headers = usingFakeMail()
    ? { [MAIL_KIND_HEADER]: kind, [MAIL_TEAM_HEADER]: teamId === null ? "none" : String(teamId) }
    : undefined;
  await transport.sendMail({ from: getEnv().MAIL_FROM, ...mail, headers });
}

/** True when mail goes to the local fake, so the outbox page may show it. */
export function usingFakeMail(): boolean {
  return !getEnv().SMTP_URL;
}
