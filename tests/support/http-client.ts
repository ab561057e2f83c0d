import { readStoredMail } from "~/lib/infra/fake-smtp.server";

import { randomInt } from "node:crypto";

// A tiny browser stand-in for HTTP-level tests: keeps cookies, remembers the CSRF token of the
// last page it loaded, posts forms like a browser does (urlencoded, Origin header) and never
// follows redirects, so tests see each status and Location. Each client comes from its own
// address (X-Forwarded-For, for a server started with TRUST_PROXY=loopback), so one test's
// failed sign-ins never throttle another's.

export class HttpClient {
  readonly cookies = new Map<string, string>();
  csrf = "";

  constructor(
    readonly base: string,
    readonly ip = `10.${randomInt(256)}.${randomInt(256)}.${randomInt(1, 255)}`,
  ) {}

  /** The Cookie header this client sends (for requests made with fetch directly). */
  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join("; ");
  }

  private headers(extra: Record<string, string>): Record<string, string> {
    return {
      Cookie: this.cookieHeader(),
      "X-Forwarded-For": this.ip,
      ...extra,
    };
  }

  private keep(response: Response) {
    for (const line of response.headers.getSetCookie()) {
      const [pair] = line.split(";");
      const eq = pair!.indexOf("=");
      const name = pair!.slice(0, eq);
      const value = pair!.slice(eq + 1);
      if (/max-age=0/i.test(line) || value === "") this.cookies.delete(name);
      else this.cookies.set(name, value);
    }
  }

  async get(
    path: string,
    headers: Record<string, string> = {},
  ): Promise<Response & { html: string }> {
    const response = await fetch(this.base + path, {
      redirect: "manual",
      headers: this.headers(headers),
    });
    this.keep(response);
    const html = (await response.text()).replaceAll("<!-- -->", "");
    const token = /name="csrf" value="([^"]*)"/.exec(html)?.[1];
    if (token) this.csrf = token;
    return Object.assign(response, { html });
  }

  /** Posts a form; adds the remembered CSRF token unless `fields.csrf` is given (null: leave it out). */
  async post(
    path: string,
    fields: Record<string, string | null>,
    headers: Record<string, string> = {},
  ): Promise<Response & { html: string }> {
    const body = new URLSearchParams();
    if (!("csrf" in fields)) body.set("csrf", this.csrf);
    for (const [k, v] of Object.entries(fields)) if (v !== null) body.set(k, v);
    const response = await fetch(this.base + path, {
      method: "POST",
      redirect: "manual",
      headers: this.headers({
        "Content-Type": "application/x-www-form-urlencoded",
        Origin: this.base,
        ...headers,
      }),
      body,
    });
    this.keep(response);
    return Object.assign(response, { html: (await response.text()).replaceAll("<!-- -->", "") });
  }

  /**
   * The vehicle page's upload as a browser without JavaScript sends it (multipart, csrf field
   * first): one drive log file, test condition idle-neutral unless given. Expects the redirect
   * and resolves with the new drive log's id.
   */
  async uploadDriveLog(vehicleId: number, name: string, csv: string, condition = "idle-neutral") {
    const body = new FormData();
    body.set("csrf", this.csrf);
    body.set("intent", "upload");
    body.set("condition", condition);
    body.append("file", new Blob([csv], { type: "text/csv" }), name);
    const response = await fetch(`${this.base}/vehicles/${vehicleId}`, {
      method: "POST",
      redirect: "manual",
      headers: this.headers({ Origin: this.base }),
      body,
    });
    this.keep(response);
    const location = response.headers.get("location");
    if (response.status !== 302 || !location)
      throw new Error(`upload of ${name} answered ${response.status}: ${await response.text()}`);
    return Number(new URL(location, this.base).searchParams.get("uploaded"));
  }

  /** GET /sign-in for the cookie and token, then posts the credentials. */
  async signIn(email: string, password: string) {
    await this.get("/sign-in");
    return this.post("/sign-in", { email, password });
  }

  /** A new client at `base`, signed in (the sign-in must answer 302, or this throws). */
  static async signedIn(base: string, email: string, password: string): Promise<HttpClient> {
    const client = new HttpClient(base);
    const r = await client.signIn(email, password);
    if (r.status !== 302) throw new Error(`sign-in of ${email} answered ${r.status}, not 302`);
    return client;
  }
}

/**
 * The newest stored message to `to` in the fake SMTP server's folder. The app answers only
 * after the fake has written the file, so it is there when the response is.
 */
export async function newestMailTo(dir: string, to: string) {
  const mail = (await readStoredMail(dir)).find((m) => m.to.includes(to));
  if (!mail) throw new Error(`no mail to ${to} in ${dir}`);
  return mail;
}

/** The first link in a mail's text that starts with `base`. */
export function linkIn(text: string, base: string): string {
  const link = text.split(/\s+/).find((w) => w.startsWith(base));
  if (!link) throw new Error(`no link to ${base} in: ${text}`);
  return link;
}
