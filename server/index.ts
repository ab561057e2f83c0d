// The HTTP server: serves the React Router build (or Vite in development) with Express.
// A custom server rather than react-router-serve so that the background services (analysis
// worker pool and job runner, fake mail server) start and stop with the app (docs/decisions/003-custom-server.md).
import compression from "compression";
import express from "express";
import { format } from "node:util";
import type { ServerBuild } from "react-router";
import { getEnvOrExit } from "../app/lib/infra/env.server";
import { startFakeSmtp } from "../app/lib/infra/fake-smtp.server";
import { redactSecrets, requestLabel } from "../app/lib/base/log-redaction";
import { newNonce, securityHeaders } from "../app/lib/http/security-headers.server";
import { createRequestHandler } from "./request-handler";

// Every line this process writes goes through one redaction (app/lib/base/log-redaction.ts): share,
// reset and invitation tokens, API tokens and cookies never reach the log, whoever prints them
// (our code, React Router, Express's last-resort handler).
for (const level of ["log", "info", "warn", "error", "debug"] as const) {
  const write = console[level].bind(console);
  console[level] = (...args: unknown[]) => write(redactSecrets(format(...args)));
}

const env = getEnvOrExit();
const { HOST, PORT, NODE_ENV } = env;
const app = express();
app.disable("x-powered-by");
if (env.TRUST_PROXY) {
  const hops = Number(env.TRUST_PROXY);
  app.set(
    "trust proxy",
    Number.isInteger(hops) ? hops : env.TRUST_PROXY === "true" || env.TRUST_PROXY,
  );
}
// A response with a strong ETag is a packed body whose codings were made once
// (app/lib/http/packed-response.server.ts): sent as it is. Compressing it here would cost every
// request again and give a new representation the tag of another (RFC 9110 §8.8.3).
app.use(
  compression({
    filter: (req, res) =>
      !String(res.getHeader("ETag") ?? "").startsWith('"') && compression.filter(req, res),
  }),
);
// One line per request that takes SLOW_REQUEST_MS or longer (redacted path, no query), on answer
// or hang-up.
if (env.SLOW_REQUEST_MS >= 0) {
  app.use((req, res, next) => {
    const start = performance.now();
    res.once("close", () => {
      const ms = performance.now() - start;
      if (ms < env.SLOW_REQUEST_MS) return;
      const label = requestLabel({ method: req.method, url: `http://host${req.originalUrl}` });
      const answer = res.writableFinished ? res.statusCode : "client went away";
      console.warn(`slow request: ${label} → ${answer} after ${(ms / 1000).toFixed(1)} s`);
    });
    next();
  });
}
app.use((req, res, next) => {
  res.locals.cspNonce = newNonce();
  res.set(
    securityHeaders({
      nonce: res.locals.cspNonce as string,
      development: NODE_ENV === "development",
      https: req.protocol === "https" || !!env.APP_URL?.startsWith("https:"),
      // A share link's token is in its path: its pages send no referrer at all (they post no forms,
      // so the Origin header that same-origin keeps for our CSRF checks is not needed there).
      referrer: req.path.startsWith("/s/") ? "no-referrer" : "same-origin",
    }),
  );
  next();
});
// What loaders and actions get as `context` (app/lib/http/request.server.ts).
// Development's CSP allows inline scripts without a nonce (Vite), so pages carry none there.
const getLoadContext = (req: express.Request, res: express.Response) => ({
  cspNonce: NODE_ENV === "development" ? undefined : (res.locals.cspNonce as string),
  clientIp: req.ip,
});

// Without a real mail provider, mail goes to a local fake that keeps it for the outbox page.
// In a cluster on one machine only the first instance runs it (CLUSTER_ROLE, scripts/cluster.sh).
const firstInstance = env.CLUSTER_ROLE !== "other";
let fakeSmtp: Awaited<ReturnType<typeof startFakeSmtp>> | undefined;
if (!env.SMTP_URL && firstInstance) {
  try {
    fakeSmtp = await startFakeSmtp({ port: env.FAKE_SMTP_PORT, dir: env.MAIL_DIR });
  } catch (error) {
    const code = (error as NodeJS.ErrnoException).code;
    console.error(
      code === "EADDRINUSE"
        ? `Port ${env.FAKE_SMTP_PORT} for the local fake mail server is already in use: stop the other program or set FAKE_SMTP_PORT (or SMTP_URL for a real provider).`
        : `The local fake mail server could not start: ${(error as Error).message}`,
    );
    process.exit(1);
  }
}

if (NODE_ENV === "development") {
  const vite = await import("vite");
  // HMR_PORT lets several dev servers run side by side (Vite's default is 24678).
  const hmrPort = Number(process.env.HMR_PORT) || undefined;
  const devServer = await vite.createServer({
    server: { middlewareMode: true, hmr: hmrPort ? { port: hmrPort } : undefined },
  });
  app.use(devServer.middlewares);
  app.use(async (req, res, next) => {
    try {
      const build = (await devServer.ssrLoadModule(
        "virtual:react-router/server-build",
      )) as ServerBuild;
      return createRequestHandler({ build, getLoadContext })(req, res, next);
    } catch (error) {
      if (error instanceof Error) devServer.ssrFixStacktrace(error);
      next(error);
    }
  });
} else {
  const buildUrl = new URL("../build/server/index.js", import.meta.url);
  const build = (await import(buildUrl.href)) as ServerBuild;
  // Fingerprinted assets are immutable; everything else is revalidated.
  app.use("/assets", express.static("build/client/assets", { immutable: true, maxAge: "1y" }));
  app.use(express.static("build/client", { maxAge: "1h" }));
  app.all("/{*path}", createRequestHandler({ build, mode: NODE_ENV, getLoadContext }));
}

// Analyses run in a worker pool; jobs are claimed from the database (any instance may take them).
// Imported only now: the database client it opens reads settings already checked above.
const { startAnalysisService } = await import("../app/lib/analyses/analysis-service.server");
const analysis = startAnalysisService();
// The demo (no SMTP_URL): once its drive logs are analysed, one approved sign-off and one waiting.
if (!env.SMTP_URL && firstInstance)
  (await import("../app/demo/demo-signoffs.server")).startDemoSignoffs();

const server = app.listen(PORT, HOST, () => {
  const shown = HOST === "127.0.0.1" ? "localhost" : HOST;
  console.log(`Twistlog is serving on http://${shown}:${PORT}`);
});

// A client that asks before sending a body (Expect: 100-continue) gets its answer from the
// request handler, which refuses an over-size body before a byte of it is sent.
server.on("checkContinue", app);

server.on("error", (error: NodeJS.ErrnoException) => {
  if (error.code === "EADDRINUSE") {
    console.error(
      `Port ${PORT} on ${HOST} is already in use: stop the other program or set PORT to a free port (e.g. PORT=3001 npm start).`,
    );
  } else if (error.code === "EACCES") {
    console.error(`Not allowed to listen on port ${PORT}: choose a port above 1023 with PORT.`);
  } else {
    console.error(`The server could not start: ${error.message}`);
  }
  process.exit(1);
});

function shutdown(signal: string) {
  console.log(`${signal}: closing the server`);
  server.close(
    () => void Promise.allSettled([analysis.stop(), fakeSmtp?.close()]).then(() => process.exit(0)),
  );
  // Open keep-alive connections or a long analysis must not hold the shutdown forever; an
  // interrupted job is claimed again by the next start (app/lib/analyses/queue.server.ts).
  setTimeout(() => process.exit(0), 5_000).unref();
  server.closeAllConnections?.();
}
process.on("SIGINT", () => shutdown("SIGINT"));
process.on("SIGTERM", () => shutdown("SIGTERM"));

// Last resort: an error that escapes one request (a stream error without a listener, a promise
// nobody awaits) must not end the process for everyone else. Continuing is acceptable here
// because requests share no in-memory state that such an error could leave half-changed, and
// analysis jobs live in the database (a job whose worker died is claimed again). One line, the
// error's name and message only: no request data, no settings. Shutdown stays with the signals.
function keepServing(kind: string, error: unknown) {
  const e = error instanceof Error ? error : new Error(String(error));
  const code = (e as NodeJS.ErrnoException).code;
  console.error(`${kind} (kept serving): ${e.name}${code ? ` ${code}` : ""}: ${e.message}`);
}
process.on("uncaughtException", (error) => keepServing("Uncaught exception", error));
process.on("unhandledRejection", (reason) => keepServing("Unhandled rejection", reason));
