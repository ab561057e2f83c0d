import { describe, expect, it } from "vitest";
import { vehicleFormSchema } from "~/components/vehicle-form";
import { createShareSchema, emailShareSchema } from "~/lib/domain/share-schema";

// Issue 11: a form reports every problem of one submission, not one per submit. The vehicle
// form and the share forms have no checks across fields, so each field's error comes back in
// the same answer; these tests keep it that way, and keep zod's own wording away from readers.
const errors = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) =>
  r.success ? [] : r.error!.issues.map((i) => i.path.join("."));

describe("every field's error in one answer", () => {
  it("the vehicle form", () => {
    const r = vehicleFormSchema.safeParse({
      name: "",
      identifier: "",
      cylinders: "four",
      stroke: "3",
      idleRpm: "fast",
      gearRatios: "3.7 x",
      firingOrderOverride: "two",
      primaryInertiaKgM2: "heavy",
      rattleLimitRadS2: "loud",
    });
    expect(new Set(errors(r))).toEqual(
      new Set([
        "name",
        "identifier",
        "cylinders",
        "stroke",
        "idleRpm",
        "gearRatios",
        "firingOrderOverride",
        "primaryInertiaKgM2",
        "rattleLimitRadS2",
      ]),
    );
    // One message per field, and none of zod's defaults ("Invalid input: expected number …").
    expect(errors(r)).toHaveLength(9);
    for (const issue of r.error!.issues)
      expect(issue.message).not.toMatch(/Invalid input|expected number/);
  });

  it("the share forms", () => {
    const email = emailShareSchema.safeParse({
      intent: "email",
      recipients: "not-an-address",
      message: "x".repeat(1001),
      expiresInDays: "0",
    });
    expect(new Set(errors(email))).toEqual(new Set(["recipients", "message", "expiresInDays"]));
    const create = createShareSchema.safeParse({
      intent: "create",
      note: "x".repeat(501),
      expiresInDays: "soon",
    });
    expect(new Set(errors(create))).toEqual(new Set(["note", "expiresInDays"]));
  });
});
