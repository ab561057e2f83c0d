import { describe, expect, it } from "vitest";
import { attachmentDisposition } from "./raw-file.server";

// RFC 8187 §3.2.1 value-chars: only attr-char and %XX; decodeURIComponent (ECMA-262) reads them.
const VALUE = /filename\*=UTF-8''((?:%[0-9A-F]{2}|[A-Za-z0-9!#$&+\-.^_`|~])*)$/;

describe("attachmentDisposition", () => {
  it("percent-encodes ' ( ) *, which encodeURIComponent would leave as they are", () => {
    const value = VALUE.exec(attachmentDisposition("(a)'b*.csv"))?.[1];
    expect(value).toBe("%28a%29%27b%2A.csv");
    expect(decodeURIComponent(value!)).toBe("(a)'b*.csv");
  });
  it("writes a lone surrogate as U+FFFD instead of throwing (encodeURIComponent throws URIError)", () => {
    expect(() => encodeURIComponent("a\ud800.csv")).toThrow(URIError);
    const value = VALUE.exec(attachmentDisposition("a\ud800.csv"))?.[1];
    expect(decodeURIComponent(value!)).toBe("a\ufffd.csv");
  });
  it("falls back to a plain name when nothing of the name is plain ASCII", () => {
    expect(attachmentDisposition("测试.csv")).toMatch(/^attachment; filename="drive-log.csv"; /);
    expect(attachmentDisposition("Öl 1.csv")).toMatch(/^attachment; filename="_l 1.csv"; /);
    expect(attachmentDisposition("\r\n")).toMatch(/^attachment; filename="drive-log.csv"; /);
  });
});
