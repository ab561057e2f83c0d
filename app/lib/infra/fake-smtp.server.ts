import { simpleParser } from "mailparser";
import { randomBytes } from "node:crypto";
import { createWriteStream } from "node:fs";
import { mkdir, readdir, readFile } from "node:fs/promises";
import { join } from "node:path";
import { pipeline } from "node:stream/promises";
import { SMTPServer } from "smtp-server";

/**
 * A local stand-in for a mail provider: accepts every message on 127.0.0.1 and stores it as
 * `<time>-<random>.eml` in `dir`. Started by server/index.ts when SMTP_URL is unset.
 * No TLS and no AUTH: smtp-server's bundled certificate is expired (docs/stack-notes.md).
 */
export async function startFakeSmtp(options: { port: number; dir: string }) {
  await mkdir(options.dir, { recursive: true });
  const server = new SMTPServer({
    authOptional: true,
    // The sender is this machine: no reverse DNS lookup (up to 1.5 s per message where DNS is slow).
    disableReverseLookup: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    size: 1024 * 1024,
    logger: false,
    onData(stream, _session, callback) {
      const name = `${Date.now()}-${randomBytes(4).toString("hex")}.eml`;
      pipeline(stream, createWriteStream(join(options.dir, name))).then(
        () => callback(),
        (error: Error) => callback(error),
      );
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, "127.0.0.1", () => {
      server.off("error", reject);
      resolve();
    });
  });
  return {
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

export interface StoredMail {
  id: string;
  to: string;
  subject: string;
  date: Date | null;
  text: string;
  /** From the app's own headers (mail.server.ts); null on a message without them. */
  kind: string | null;
  teamId: number | null;
}

/** The newest `limit` stored messages, newest first; an absent folder is an empty outbox. */
export async function readStoredMail(dir: string, limit = 50): Promise<StoredMail[]> {
  let names: string[];
  try {
    names = (await readdir(dir)).filter((n) => n.endsWith(".eml"));
  } catch {
    return [];
  }
  names.sort().reverse();
  return Promise.all(
    names.slice(0, limit).map(async (name) => {
      const parsed = await simpleParser(await readFile(join(dir, name)));
      const to = Array.isArray(parsed.to)
        ? parsed.to.map((a) => a.text).join(", ")
        : (parsed.to?.text ?? "");
      return {
        id: name.replace(/\.eml$/, ""),
        to,
        subject: parsed.subject ?? "(no subject)",
        date: parsed.date ?? null,
        text: parsed.text ?? "",
        kind: headerText(parsed.headers.get("x-twistlog-kind")),
        teamId: Number(headerText(parsed.headers.get("x-twistlog-team"))) || null,
      };
    }),
  );
}

function headerText(value: unknown): string | null {
  return typeof value === "string" ? value : null;
}
