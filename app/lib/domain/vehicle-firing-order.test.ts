import { describe, expect, it } from "vitest";
import { vehicleFiringOrder } from "./vehicle-firing-order";

// Source: a four-stroke engine fires each cylinder once every two crank revolutions, so z
// cylinders give z/2 firings per revolution; a two-stroke fires each cylinder every revolution,
// giving z (Heywood, Internal Combustion Engine Fundamentals, ch. 1, working cycles; from memory).
const engine = (cylinders: number, stroke: number, firingOrderOverride: number | null = null) => ({
  cylinders,
  stroke,
  firingOrderOverride,
});

describe("the firing order of a vehicle", () => {
  it("four-stroke: z/2, so 3, 4, 6 and 8 cylinders give 1.5, 2, 3 and 4 (Heywood, from memory)", () => {
    expect(vehicleFiringOrder(engine(3, 4))).toBe(1.5);
    expect(vehicleFiringOrder(engine(4, 4))).toBe(2);
    expect(vehicleFiringOrder(engine(6, 4))).toBe(3);
    expect(vehicleFiringOrder(engine(8, 4))).toBe(4);
  });

  it("two-stroke: z, so 2 and 3 cylinders give 2 and 3 (Heywood, from memory)", () => {
    expect(vehicleFiringOrder(engine(2, 2))).toBe(2);
    expect(vehicleFiringOrder(engine(3, 2))).toBe(3);
  });

  it("the override wins over the cylinder rule (4 cylinders with two deactivated fire at order 1: z/2 of the 2 that run)", () => {
    expect(vehicleFiringOrder(engine(4, 4, 1))).toBe(1);
    expect(vehicleFiringOrder(engine(3, 2, 1.5))).toBe(1.5);
  });

  it("a stored stroke other than 2 counts as four-stroke, as the vehicle form allows only 2 and 4", () => {
    expect(vehicleFiringOrder(engine(4, 0))).toBe(2);
  });

  it("no firing order for an impossible cylinder count without an override", () => {
    expect(vehicleFiringOrder(engine(0, 4))).toBeNull();
    expect(vehicleFiringOrder(engine(0, 4, 2))).toBe(2);
  });
});
