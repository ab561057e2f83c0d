/**
 * A body that never changes for its key (one analysis version: a re-analysis is a new row with a
 * new id), packed once: its bytes, its gzip and brotli codings (RFC 9110 §8.4) and the opaque part
 * of a strong entity tag. app/lib/http/packed-response.server.ts answers requests with it; the
 * note is docs/serving-speed.md.
 */
import { createHash } from "node:crypto";
import { promisify } from "node:util";
import { brotliCompress, constants, gzip } from "node:zlib";

const gzipAsync = promisify(gzip);
const brotliAsync = promisify(brotliCompress);

export interface PackedBody {
  /** The body's bytes (UTF-8) and their two codings. */
  identity: Buffer;
  gzip: Buffer;
  br: Buffer;
  /** The opaque part of the identity representation's strong ETag (base64url SHA-256, 27 chars). */
  tag: string;
}

/**
 * Packs a JSON text: the codings are made at the best ratio, in the thread pool (zlib's async
 * calls), once per analysis version; the chart body of a run-up takes about 0.3 s this way,
 * which its first request waits for and no later one does.
 */
export async function packBody(text: string): Promise<PackedBody> {
  const identity = Buffer.from(text, "utf8");
  const [gz, br] = await Promise.all([
    gzipAsync(identity, { level: 9 }),
    brotliAsync(identity, {
      params: {
        [constants.BROTLI_PARAM_MODE]: constants.BROTLI_MODE_TEXT,
        [constants.BROTLI_PARAM_QUALITY]: constants.BROTLI_MAX_QUALITY,
        [constants.BROTLI_PARAM_SIZE_HINT]: identity.length,
      },
    }),
  ]);
  const tag = createHash("sha256").update(identity).digest("base64url").slice(0, 27);
  return { identity, gzip: gz, br, tag };
}
