import { createHash, randomBytes, timingSafeEqual } from "node:crypto";

/**
 * A new secret for a link, cookie or API token: 32 random bytes (256 bits, above the 128 the
 * design asks for), base64url so it survives URLs and headers unescaped (43 characters).
 */
export function newSecret(prefix = ""): string {
  return prefix + randomBytes(32).toString("base64url");
}

/** sha256 of a secret, hex (64 characters): what the database keeps instead of the secret. */
export function sha256Hex(secret: string): string {
  return createHash("sha256").update(secret, "utf8").digest("hex");
}

/** Constant-time string comparison (lengths may differ; then simply false). */
export function sameSecret(a: string, b: string): boolean {
  const x = Buffer.from(a, "utf8");
  const y = Buffer.from(b, "utf8");
  return x.length === y.length && timingSafeEqual(x, y);
}
