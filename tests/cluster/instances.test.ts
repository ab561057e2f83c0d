/**
 * Issue 18, "Must show": what one instance decides holds on the other at once — a session
 * made on one instance works on the other, a share link revoked through one is refused by the
 * other, a new analysis version replaces the chart body the other holds in memory, and the
 * sign-in throttle counts failures across both. Each instance is asked directly
 * (its own port, no load balancer), so the test knows which one answered.
 */
import { describe, expect, it } from "vitest";
import { analyticIdleCsv } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { TEST_PASSWORD } from "../support/accounts";
import { THROTTLE } from "~/lib/infra/throttle.server";
import { apiJson, appUrl, clusterTeam, sleep, uploadLog } from "./cluster";

const { team, vehicleId, technician, engineer } = await clusterTeam("Instances");

describe("two app instances, one installation", () => {
  it("a session made on instance 1 is honoured by instance 2, and signing out on 2 ends it on 1", async () => {
    const one = await HttpClient.signedIn(appUrl(1), team.accounts.engineer.email, TEST_PASSWORD);
    const two = new HttpClient(appUrl(2), one.ip);
    for (const [k, v] of one.cookies) two.cookies.set(k, v);
    const page = await two.get("/vehicles");
    expect(page.status).toBe(200);
    expect(page.html).toContain("Instances car");

    const out = await two.post("/sign-out", {});
    expect(out.status).toBe(302);
    const after = await fetch(`${appUrl(1)}/vehicles`, {
      redirect: "manual",
      headers: { Cookie: one.cookieHeader() },
    });
    expect(after.status).toBe(302);
    expect(after.headers.get("location")).toContain("/sign-in");
  });

  it("a share link revoked through instance 1 is refused by instance 2 at once", async () => {
    const csv = analyticIdleCsv({
      rpm: 800,
      order: 2,
      crankAmpRpm: 12,
      naturalHz: 8,
      zeta: 0.1,
      durationS: 4,
      sampleRateHz: 2000,
    });
    const up = await uploadLog(
      appUrl(1),
      { vehicleId, token: technician, condition: "idle-neutral" },
      new Blob([csv], { type: "text/csv" }),
      "instances-idle.csv",
    );
    expect(up.status).toBe(202);
    const logId = up.body.log.id;
    for (let status = ""; status !== "done"; await sleep(300)) {
      const r = await apiJson<{ log: { status: string } }>(
        appUrl(2),
        `/api/v1/logs/${logId}`,
        technician,
      );
      status = r.body.log.status;
      expect(status).not.toBe("failed");
    }
    const made = await apiJson<{ share: { id: number; url: string } }>(
      appUrl(1),
      `/api/v1/logs/${logId}/shares`,
      engineer,
      { method: "POST", headers: { "Content-Type": "application/json" }, body: "{}" },
    );
    expect(made.status).toBe(201);
    const path = new URL(made.body.share.url).pathname;
    expect((await fetch(appUrl(2) + path)).status).toBe(200);

    const revoked = await fetch(`${appUrl(1)}/api/v1/shares/${made.body.share.id}`, {
      method: "DELETE",
      headers: { Authorization: `Bearer ${engineer}` },
    });
    expect(revoked.status).toBe(200);
    // At once: no wait between the revocation's answer and the other instance's refusal.
    expect((await fetch(appUrl(2) + path)).status).toBe(410);
    expect((await fetch(`${appUrl(2)}${path}/charts.json`)).status).toBe(410);
  });

  it("a new analysis version made through instance 1 is what instance 2 serves next", async () => {
    const logs = await apiJson<{ logs: { id: number }[] }>(
      appUrl(2),
      `/api/v1/vehicles/${vehicleId}/logs`,
      technician,
    );
    const logId = logs.body.logs[0]!.id; // the analysed idle log of the test above
    const viewer = await HttpClient.signedIn(appUrl(2), team.accounts.viewer.email, TEST_PASSWORD);
    const charts = async () =>
      (await (
        await fetch(`${appUrl(2)}/vehicles/${vehicleId}/logs/${logId}/charts.json`, {
          headers: { Cookie: viewer.cookieHeader() },
        })
      ).json()) as { analysis: { id: number; version: number } };
    const before = await charts(); // instance 2 now holds this version's chart body in memory
    const batch = await apiJson<{ batchId: string }>(
      appUrl(1),
      `/api/v1/vehicles/${vehicleId}/reanalyse`,
      engineer,
      {
        method: "POST",
        headers: { "Content-Type": "application/json" },
        body: '{"revsPerBlock":16}',
      },
    );
    expect(batch.status).toBe(202);
    for (let finished = false; !finished; await sleep(300)) {
      const r = await apiJson<{ finished: boolean; failed: number }>(
        appUrl(1),
        `/api/v1/vehicles/${vehicleId}/reanalyse/${batch.body.batchId}`,
        engineer,
      );
      expect(r.body.failed).toBe(0);
      finished = r.body.finished;
    }
    const after = await charts();
    expect(after.analysis.version).toBe(before.analysis.version + 1);
    expect(after.analysis.id).not.toBe(before.analysis.id);
  });

  it("the sign-in throttle counts failed sign-ins made on both instances together", async () => {
    // THROTTLE.perAccount = 5 failures per account in 15 minutes (throttle.server.ts): three
    // wrong passwords on instance 1 and two on instance 2 make five.
    const ip = "10.18.0.7";
    const email = team.accounts.viewer.email;
    for (let i = 0; i < THROTTLE.perAccount; i++) {
      const client = new HttpClient(appUrl(1 + (i % 2)), ip);
      expect((await client.signIn(email, `guess ${i}`)).status, `failure ${i + 1}`).toBe(400);
    }
    // Now the right password is refused too, on either instance: the account is throttled.
    for (const i of [2, 1]) {
      const r = await new HttpClient(appUrl(i), ip).signIn(email, TEST_PASSWORD);
      expect(r.status, `instance ${i}`).toBe(429);
      expect(r.html).toContain("Too many failed sign-ins");
    }
  });
});
