import { describe, expect, it } from "vitest";
import { deepFreeze, Lru } from "./lru";

// The eviction rule checked here is the textbook least-recently-used policy (common practice:
// evict the entry whose last use is oldest); the freeze rule is ECMAScript's: assigning to a
// property of a frozen object throws a TypeError in strict-mode code (ECMA-262, [[Set]] on a
// non-writable property).

describe("Lru", () => {
  it("drops the least recently set entry beyond its size", () => {
    const lru = new Lru<number, string>(2);
    lru.set(1, "a");
    lru.set(2, "b");
    lru.set(3, "c");
    expect(lru.get(1)).toBeUndefined();
    expect(lru.get(2)).toBe("b");
    expect(lru.get(3)).toBe("c");
    expect(lru.size).toBe(2);
  });

  it("counts a get as a use, so the entry read last survives", () => {
    const lru = new Lru<number, string>(2);
    lru.set(1, "a");
    lru.set(2, "b");
    expect(lru.get(1)).toBe("a");
    lru.set(3, "c");
    expect(lru.get(2)).toBeUndefined();
    expect(lru.get(1)).toBe("a");
  });

  it("replaces a value set again without growing, and forgets a deleted key", () => {
    const lru = new Lru<string, number>(3);
    lru.set("x", 1);
    lru.set("x", 2);
    expect(lru.size).toBe(1);
    expect(lru.get("x")).toBe(2);
    lru.delete("x");
    expect(lru.get("x")).toBeUndefined();
    expect(lru.size).toBe(0);
  });
});

describe("deepFreeze", () => {
  it("makes nested objects and arrays read-only", () => {
    const value = deepFreeze({ a: { b: [1, 2, [3]] }, c: "text" });
    expect(() => {
      (value.a.b as number[])[0] = 9;
    }).toThrow(TypeError);
    expect(() => (value.a.b as number[]).push(4)).toThrow(TypeError);
    expect(() => ((value.a.b[2] as number[])[0] = 9)).toThrow(TypeError);
    expect(() => {
      (value as { c: string }).c = "other";
    }).toThrow(TypeError);
    expect(value).toEqual({ a: { b: [1, 2, [3]] }, c: "text" });
  });

  it("returns primitives and null unchanged", () => {
    expect(deepFreeze(null)).toBeNull();
    expect(deepFreeze(5)).toBe(5);
  });
});
