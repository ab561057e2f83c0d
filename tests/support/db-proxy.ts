import net from "node:net";
import { freePort } from "./processes";

/**
 * A TCP relay in front of the test database, so a test can take "the database" away from one
 * server and give it back (an outage) without stopping the MariaDB every test shares.
 */
export async function startDbProxy(target: { host: string; port: number }) {
  const port = await freePort();
  const sockets = new Set<net.Socket>();
  let up = true;
  const server = net.createServer((client) => {
    if (!up) return client.destroy();
    const upstream = net.connect(target.port, target.host);
    for (const s of [client, upstream]) {
      sockets.add(s);
      s.on("close", () => sockets.delete(s));
      s.on("error", () => {
        client.destroy();
        upstream.destroy();
      });
    }
    client.pipe(upstream).pipe(client);
  });
  await new Promise<void>((resolve) => server.listen(port, "127.0.0.1", resolve));
  return {
    port,
    /** Every open connection is cut and new ones are refused until `restore`. */
    cut() {
      up = false;
      for (const s of sockets) s.destroy();
    },
    restore() {
      up = true;
    },
    close: () =>
      new Promise<void>((resolve) => {
        for (const s of sockets) s.destroy();
        server.close(() => resolve());
      }),
  };
}
