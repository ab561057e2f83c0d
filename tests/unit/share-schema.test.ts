import { describe, expect, it } from "vitest";
import { parseCommentSubject, postCommentSchema } from "~/lib/domain/comment-schema";
import {
  apiCreateShareSchema,
  createShareSchema,
  emailShareSchema,
} from "~/lib/domain/share-schema";

// The pure parts of share links and comments (issue 7): subject keys, form and API limits.

describe("comment subjects", () => {
  it("a comparison's key lists its ids sorted, so either order of the URL finds the same comments", () => {
    expect(parseCommentSubject("compare:8,3,5")).toEqual({
      kind: "compare",
      key: "compare:3,5,8",
      logIds: [3, 5, 8],
    });
    expect(parseCommentSubject("compare:5,3")?.key).toBe(parseCommentSubject("compare:3,5")?.key);
    expect(parseCommentSubject("log:42")).toEqual({ kind: "log", key: "log:42", logIds: [42] });
  });

  it.each([
    "",
    "log:",
    "log:0",
    "log:1,2",
    "compare:4",
    "compare:4,4",
    "compare:1,2,3,4,5,6,7,8,9",
    "vehicle:3",
    "log:3 ",
  ])("%j is not a subject", (value) => {
    expect(parseCommentSubject(value)).toBeNull();
  });
});

describe("share link limits", () => {
  const form = (fields: Record<string, string>) =>
    createShareSchema.safeParse({ intent: "create", ...fields });

  it("the expiry is 14 days unless chosen, and must be a whole number from 1 to 90", () => {
    expect(form({}).data?.expiresInDays).toBe(14);
    expect(form({ expiresInDays: "" }).data?.expiresInDays).toBe(14);
    expect(form({ expiresInDays: "1" }).data?.expiresInDays).toBe(1);
    expect(form({ expiresInDays: "90" }).data?.expiresInDays).toBe(90);
    for (const bad of ["0", "91", "2.5", "ten", "-3"]) {
      const r = form({ expiresInDays: bad });
      expect(r.success).toBe(false);
      expect(r.error?.issues[0]?.message).toBe("Choose a whole number of days from 1 to 90.");
    }
  });

  it("the raw file is off unless the box is ticked", () => {
    expect(form({}).data?.allowRawDownload).toBe(false);
    expect(form({ allowRawDownload: "on" }).data?.allowRawDownload).toBe(true);
  });

  it("the API body takes numbers only and names unknown fields", () => {
    expect(apiCreateShareSchema.parse({})).toEqual({
      expiresInDays: 14,
      note: "",
      allowRawDownload: false,
    });
    expect(apiCreateShareSchema.safeParse({ expiresInDays: "14" }).success).toBe(false);
    const unknown = apiCreateShareSchema.safeParse({ days: 3 });
    expect(unknown.error?.issues[0]?.code).toBe("unrecognized_keys");
  });

  it("recipients: split on commas, spaces and lines, lower-cased, duplicates dropped, at most 10", () => {
    const r = emailShareSchema.parse({
      intent: "email",
      recipients: "A@Supplier.example,\n b@x.example; a@supplier.example",
    });
    expect(r.recipients).toEqual(["a@supplier.example", "b@x.example"]);
    const eleven = Array.from({ length: 11 }, (_, i) => `p${i}@x.example`).join(",");
    expect(
      emailShareSchema.safeParse({ intent: "email", recipients: eleven }).error?.issues[0]?.message,
    ).toBe("At most 10 addresses at a time.");
  });
});

describe("comment pins", () => {
  const post = (fields: Record<string, string>) =>
    postCommentSchema.safeParse({ intent: "post", body: "x", ...fields });

  it("a pin needs its value; a time is not negative; an engine speed is positive", () => {
    expect(post({}).data).toMatchObject({ pinKind: "none" });
    expect(post({ pinKind: "rpm", pinValue: "1500" }).data?.pinValue).toBe(1500);
    // A decimal comma is read as a point (as in the drive-log CSVs, docs/signal-ingest.md).
    expect(post({ pinKind: "time", pinValue: "32,5" }).data?.pinValue).toBe(32.5);
    expect(post({ pinKind: "time" }).error?.issues[0]?.message).toBe("Enter the time in seconds.");
    expect(post({ pinKind: "time", pinValue: "-1" }).error?.issues[0]?.message).toBe(
      "A time is 0 s or later.",
    );
    expect(post({ pinKind: "rpm", pinValue: "0" }).error?.issues[0]?.message).toBe(
      "An engine speed is above 0 and at most 20000 rpm.",
    );
  });
});
