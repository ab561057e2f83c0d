import { randomBytes } from "node:crypto";

/** A fresh nonce for one response's inline scripts (React Router's hydration data). */
export function newNonce(): string {
  return randomBytes(16).toString("base64");
}

/**
 * Security headers for every response. The CSP allows only our own origin, and inline scripts
 * only with this response's nonce. Development adds what Vite's hot reload needs (inline
 * styles, its websocket), which production never gets.
 */
export function securityHeaders(options: {
  nonce: string;
  development: boolean;
  https: boolean;
  referrer?: "same-origin" | "no-referrer";
}): Record<string, string> {
  const { nonce, development } = options;
  const csp = [
    "default-src 'self'",
    development ? "script-src 'self' 'unsafe-inline'" : `script-src 'self' 'nonce-${nonce}'`,
    development ? "style-src 'self' 'unsafe-inline'" : "style-src 'self'",
    "img-src 'self' data:",
    "font-src 'self'",
    development ? "connect-src 'self' ws://localhost:* ws://127.0.0.1:*" : "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
  ].join("; ");
  const headers: Record<string, string> = {
    "Content-Security-Policy": csp,
    "X-Frame-Options": "DENY",
    "X-Content-Type-Options": "nosniff",
    // Links carry single-use tokens in their path: never send our URLs to other sites.
    "Referrer-Policy": options.referrer ?? "same-origin",
    "Cross-Origin-Opener-Policy": "same-origin",
    "Permissions-Policy": "camera=(), microphone=(), geolocation=(), payment=()",
  };
  if (options.https) headers["Strict-Transport-Security"] = "max-age=31536000";
  return headers;
}
