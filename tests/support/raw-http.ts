import http from "node:http";

// A client that sends a large request body piece by piece with node:http (fetch would buffer
// or refuse to read an answer that arrives before its body is sent), and notes how much of the
// body had gone out when the answer came: the measure of "refused before reading".

export interface RawAnswer {
  status: number;
  headers: http.IncomingHttpHeaders;
  body: string;
  /** Bytes of the request body written before the answer's headers arrived. */
  sentBeforeAnswer: number;
}

export function sendBody(
  base: string,
  path: string,
  options: {
    method?: string;
    headers?: Record<string, string>;
    /** Body size; with `contentLength` it is announced, else sent chunked. */
    bytes: number;
    contentLength?: boolean;
    /** Ask first (Expect: 100-continue) and send the body only after "100 Continue". */
    expectContinue?: boolean;
    byte?: number;
  },
): Promise<RawAnswer> {
  const url = new URL(path, base);
  const headers: Record<string, string> = { ...options.headers };
  if (options.contentLength) headers["Content-Length"] = String(options.bytes);
  if (options.expectContinue) headers.Expect = "100-continue";
  const piece = Buffer.alloc(64 * 1024, options.byte ?? 0x61);
  return new Promise((resolve, reject) => {
    const req = http.request({
      host: url.hostname,
      port: url.port,
      path: url.pathname + url.search,
      method: options.method ?? "POST",
      headers,
    });
    let sent = 0;
    let answered = false;
    let sentBeforeAnswer = 0;
    const pump = () => {
      while (!answered && sent < options.bytes) {
        const n = Math.min(piece.length, options.bytes - sent);
        sent += n;
        if (!req.write(n === piece.length ? piece : piece.subarray(0, n))) {
          req.once("drain", pump);
          return;
        }
      }
      if (!answered) req.end();
    };
    req.on("response", (res) => {
      answered = true;
      sentBeforeAnswer = sent;
      let body = "";
      res.setEncoding("utf8");
      res.on("data", (d: string) => (body += d));
      res.on("end", () => {
        resolve({ status: res.statusCode ?? 0, headers: res.headers, body, sentBeforeAnswer });
        req.destroy();
      });
    });
    // After the answer the server may close the connection on the rest of a refused body.
    req.on("error", (error) => {
      if (!answered) reject(error);
    });
    if (options.expectContinue) {
      req.flushHeaders();
      req.once("continue", pump);
    } else pump();
  });
}
