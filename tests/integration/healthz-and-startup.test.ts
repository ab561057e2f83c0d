import { connect, createServer, type Server } from "node:net";
import { afterAll, describe, expect, it } from "vitest";
import { loader } from "~/routes/healthz";
import { pool } from "~/lib/infra/db.server";
import { freePort, ownMail, runTs, startServer } from "../support/processes";

// /healthz and start-up errors, against the real MariaDB and the production build
// (scripts/test.sh builds before vitest runs).

afterAll(async () => {
  await pool.end();
});

describe("GET /healthz", () => {
  it("answers 200 {ok:true, db:'up'} when the database answers", async () => {
    const response = await loader();
    expect(response.status).toBe(200);
    expect(await response.json()).toEqual({ ok: true, db: "up" });
  });

  it("answers an HTTP/1.0 request without a Host header (a load balancer's health check)", async () => {
    // RFC 9112 §3.2: a Host header is required in HTTP/1.1 only; HTTP/1.0 clients may omit it.
    const server = await startServer({});
    try {
      const { port } = new URL(server.url);
      const answer = await new Promise<string>((resolve, reject) => {
        const socket = connect(Number(port), "127.0.0.1", () =>
          socket.write("GET /healthz HTTP/1.0\r\n\r\n"),
        );
        let text = "";
        socket.on("data", (d) => (text += d));
        socket.on("end", () => resolve(text));
        socket.on("error", reject);
      });
      expect(answer.split("\r\n")[0]).toMatch(/^HTTP\/1\.[01] 200 /);
      expect(answer).toContain('{"ok":true,"db":"up"}');
    } finally {
      await server.stop();
    }
  });

  it("answers 503 with a reason, and no stack trace, when no database listens", async () => {
    const deadPort = await freePort();
    const server = await startServer({ DATABASE_PORT: String(deadPort) });
    try {
      const response = await fetch(`${server.url}/healthz`);
      expect(response.status).toBe(503);
      const body = (await response.json()) as { ok: boolean; db: string; reason: string };
      expect(body.ok).toBe(false);
      expect(body.db).toBe("down");
      expect(body.reason).toContain(`127.0.0.1:${deadPort}`);
      expect(body.reason).toMatch(/DATABASE_PORT/);
      expect(JSON.stringify(body)).not.toMatch(/\bat .*\.(js|ts):\d+/);
    } finally {
      await server.stop();
    }
  });

  it("names the password setting when the database refuses the credentials", async () => {
    const server = await startServer({ DATABASE_PASSWORD: "not-the-password" });
    try {
      const response = await fetch(`${server.url}/healthz`);
      expect(response.status).toBe(503);
      const body = (await response.json()) as { reason: string };
      expect(body.reason).toMatch(/refused user .*DATABASE_PASSWORD/);
    } finally {
      await server.stop();
    }
  });
});

describe("bad environment gives one line that says what to change", () => {
  it("migrations with a wrong password", async () => {
    const result = await runTs("scripts/migrate.ts", { DATABASE_PASSWORD: "wrong" });
    expect(result.code).toBe(1);
    const lines = result.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/DATABASE_USER and DATABASE_PASSWORD/);
  });

  it("a port that is already taken", async () => {
    const port = await freePort();
    const squatter: Server = createServer();
    await new Promise<void>((resolve) => squatter.listen(port, "127.0.0.1", resolve));
    try {
      const result = await runTs("server/index.ts", {
        NODE_ENV: "production",
        PORT: String(port),
        ...(await ownMail()),
      });
      expect(result.code).toBe(1);
      const lines = result.stderr.trim().split("\n");
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(new RegExp(`Port ${port} .* already in use: .*set PORT`));
    } finally {
      squatter.close();
    }
  });

  it("a malformed setting", async () => {
    const result = await runTs("server/index.ts", { NODE_ENV: "production", PORT: "eighty" });
    expect(result.code).toBe(1);
    expect(result.stderr.trim()).toMatch(
      /^PORT is not valid .*: fix it or unset it to use the default\.$/,
    );
  });
});
