import { describe, expect, it } from "vitest";
import { sharedCache } from "./shared-cache";

describe("sharedCache", () => {
  it("makes a key once for concurrent requests, keeps what `keep` allows, and makes a failure again", async () => {
    const get = sharedCache<{ ok: boolean; n: number }>(2, (v) => v.ok);
    let made = 0;
    const make = (ok: boolean) => async () => ({ ok, n: ++made });
    const [a, b] = await Promise.all([get("a", make(true)), get("a", make(true))]);
    expect(a).toBe(b);
    expect(made).toBe(1);
    expect(await get("a", make(true))).toBe(a);
    const failed = await get("f", make(false));
    expect((await get("f", make(false))).n).toBe(failed.n + 1);
  });
});
