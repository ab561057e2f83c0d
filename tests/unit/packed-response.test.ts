import { brotliDecompressSync, gunzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import { packBody } from "~/lib/base/packed-body.server";
import { chooseCoding, noneMatch, packedResponse } from "~/lib/http/packed-response.server";

// The packed body and its answers without a database: entity-tag comparison and content-coding
// choice against the examples and rules of RFC 9110, the codings decoded by node:zlib.

describe("entity-tag comparison for If-None-Match", () => {
  // RFC 9110 §8.8.3.2, the example table: weak comparison matches when the opaque tags are equal,
  // whether either is weak or not; If-None-Match uses the weak function (§13.1.2).
  it.each([
    ['W/"1"', 'W/"1"', true],
    ['W/"1"', 'W/"2"', false],
    ['W/"1"', '"1"', true],
    ['"1"', '"1"', true],
  ])("%s against %s: %s", (listed, etag, expected) => {
    expect(noneMatch(listed, etag)).toBe(expected);
  });

  it('a list matches when any member does; "*" matches any current representation', () => {
    // RFC 9110 §13.1.2: If-None-Match = "*" / #entity-tag.
    expect(noneMatch('"a", W/"b" , "c"', '"b"')).toBe(true);
    expect(noneMatch('"a", "c"', '"b"')).toBe(false);
    expect(noneMatch("*", '"b"')).toBe(true);
    expect(noneMatch(null, '"b"')).toBe(false);
    // An unquoted value is no entity-tag (§8.8.3: entity-tag = [ weak ] opaque-tag, quoted).
    expect(noneMatch("b", '"b"')).toBe(false);
  });
});

describe("content-coding choice from Accept-Encoding", () => {
  it("follows the q-values of RFC 9110 §12.5.3", () => {
    // The section's examples.
    expect(chooseCoding("compress, gzip")).toBe("gzip");
    expect(chooseCoding("")).toBe("identity");
    expect(chooseCoding("*")).toBe("br");
    expect(chooseCoding("compress;q=0.5, gzip;q=1.0")).toBe("gzip");
    expect(chooseCoding("gzip;q=1.0, identity; q=0.5, *;q=0")).toBe("gzip");
    // q=0 means "not acceptable" (§12.4.2); a higher q wins; brotli first at equal q.
    expect(chooseCoding("gzip, br;q=0")).toBe("gzip");
    expect(chooseCoding("br;q=0.4, gzip;q=0.8")).toBe("gzip");
    expect(chooseCoding("gzip, deflate, br")).toBe("br");
    expect(chooseCoding("deflate")).toBe("identity");
    expect(chooseCoding(null)).toBe("identity");
  });
});

describe("a packed body's answers", () => {
  const text = JSON.stringify({ values: Array.from({ length: 4000 }, (_, i) => Math.sin(i / 7)) });
  const get = (headers: Record<string, string>) =>
    new Request("http://127.0.0.1/x.json", { headers });

  it("gzip and br decode (node:zlib, RFC 1952 and RFC 7932) to exactly the identity bytes", async () => {
    const packed = await packBody(text);
    expect(packed.identity.toString("utf8")).toBe(text);
    expect(gunzipSync(packed.gzip).equals(packed.identity)).toBe(true);
    expect(brotliDecompressSync(packed.br).equals(packed.identity)).toBe(true);
    // Compressed at all: JSON of sines is redundant text.
    expect(packed.gzip.length).toBeLessThan(packed.identity.length / 2);
    const br = packedResponse(get({ "Accept-Encoding": "br" }), packed);
    expect(br.headers.get("Content-Encoding")).toBe("br");
    expect(brotliDecompressSync(Buffer.from(await br.arrayBuffer())).toString()).toBe(text);
  });

  it("each coding has its own strong tag, and a 304 carries the 200's validators and no body", async () => {
    const packed = await packBody(text);
    const tags = ["identity", "gzip", "br"].map((e) =>
      packedResponse(get({ "Accept-Encoding": e }), packed).headers.get("ETag")!,
    );
    // RFC 9110 §8.8.3: a strong tag is unique across the representations of a resource.
    expect(new Set(tags).size).toBe(3);
    for (const tag of tags) expect(tag).toMatch(/^"[^"]+"$/);
    const again = await packBody(text);
    expect(packedResponse(get({}), again).headers.get("ETag")).toBe(tags[0]);
    const other = await packBody(text.replace("4", "5"));
    expect(packedResponse(get({}), other).headers.get("ETag")).not.toBe(tags[0]);

    const notModified = packedResponse(
      get({ "Accept-Encoding": "gzip", "If-None-Match": tags[1]! }),
      packed,
    );
    // RFC 9110 §15.4.5: no content; the ETag, Vary and Cache-Control the 200 would have sent.
    expect(notModified.status).toBe(304);
    expect(notModified.body).toBeNull();
    expect(notModified.headers.get("ETag")).toBe(tags[1]);
    expect(notModified.headers.get("Vary")).toBe("Accept-Encoding");
    expect(notModified.headers.get("Cache-Control")).toBe("private, no-cache");
    // The identity tag does not validate the gzip representation.
    const changedCoding = packedResponse(
      get({ "Accept-Encoding": "gzip", "If-None-Match": tags[0]! }),
      packed,
    );
    expect(changedCoding.status).toBe(200);
    expect(changedCoding.headers.get("Vary")).toBe("Accept-Encoding");
  });
});
