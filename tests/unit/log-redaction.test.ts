import { describe, expect, it } from "vitest";
import { redactSecrets, requestLabel } from "~/lib/base/log-redaction";

// Tokens in the shapes app/lib/infra/secrets.server.ts makes: 32 random bytes, base64url (43 characters).
const token = "Qm9vdHN0cmFwLXRva2VuLWZvci10ZXN0aW5nLW9ubHk";
const apiToken = `twl_${token}`;

describe("redactSecrets", () => {
  it.each([
    // React Router's own messages quote the URL.
    [
      `No route matches URL "/s/${token}/nonexistent"`,
      `No route matches URL "/s/[redacted]/nonexistent"`,
    ],
    [
      `You made a POST request to "/s/${token}" but did not provide an \`action\``,
      `You made a POST request to "/s/[redacted]" but did not provide an \`action\``,
    ],
    [`GET /reset-password/${token}: boom`, `GET /reset-password/[redacted]: boom`],
    [
      `http://127.0.0.1:3000/invitations/${token}?x=1`,
      `http://127.0.0.1:3000/invitations/[redacted]?x=1`,
    ],
    [`/sign-in?redirectTo=%2Fs%2F${token}%2Ffile`, `/sign-in?redirectTo=%2Fs%2F[redacted]%2Ffile`],
    [`Authorization: Bearer ${apiToken}`, `Authorization: Bearer [redacted]`],
    [`token ${apiToken} is unknown`, `token twl_[redacted] is unknown`],
    [
      `Cookie: twistlog_session=abc.def; twistlog_csrf=xyz`,
      `Cookie: twistlog_session=[redacted]; twistlog_csrf=[redacted]`,
    ],
    [`/account/tokens?token=${token}&page=2`, `/account/tokens?token=[redacted]&page=2`],
    [
      `Failed query: select 1 where hash = ?\nparams: 9f86d08188`,
      `Failed query: select 1 where hash = ?\nparams: [redacted]`,
    ],
  ])("%s", (line, expected) => {
    expect(redactSecrets(line)).toBe(expected);
    expect(redactSecrets(line)).not.toContain(token);
  });

  it("leaves lines without secrets as they are", () => {
    const line = "analysis queue: No database answers at 127.0.0.1:3407: start it";
    expect(redactSecrets(line)).toBe(line);
    expect(redactSecrets("GET /vehicles/12/logs/3 /settings/x")).toBe(
      "GET /vehicles/12/logs/3 /settings/x",
    );
  });

  it("labels a request by method and redacted path, without query values", () => {
    expect(requestLabel({ method: "GET", url: `http://x/s/${token}/charts.json?a=${token}` })).toBe(
      "GET /s/[redacted]/charts.json?…",
    );
  });
});
