/**
 * Preloaded (node --import) into the production server by tests/integration/last-resort.test.ts
 * only, never by the app. No request path is known to let an error escape any more, so this
 * stands in for one: once the HTTP server listens, it lets three errors escape the way they
 * used to — an 'error' on a stream nobody listens to (a cut-off upload did that), a rejected
 * promise nobody awaits, and a throw from a timer.
 */
import http from "node:http";
import { Readable } from "node:stream";

const listen = http.Server.prototype.listen;
http.Server.prototype.listen = function (this: http.Server, ...args: unknown[]) {
  this.once("listening", () =>
    setTimeout(() => {
      const reset = Object.assign(new Error("test: the client went away"), { code: "ECONNRESET" });
      new Readable({ read() {} }).destroy(reset);
      void Promise.reject(new Error("test: a promise nobody awaits"));
      setTimeout(() => {
        throw new TypeError("test: thrown from a timer");
      }, 10);
    }, 100),
  );
  return listen.apply(this, args as Parameters<typeof listen>);
} as typeof listen;
