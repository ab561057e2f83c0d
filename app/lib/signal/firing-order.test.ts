import { describe, expect, it } from "vitest";
import {
  angularAccelerationRadS2,
  firingOrder,
  orderFrequencyHz,
  RAD_S_PER_RPM,
} from "./firing-order.ts";

describe("firing order", () => {
  // Four-stroke z/2: Rahnejat et al., "Drivetrain NVH", Encyclopedia of Automotive Engineering 2014; common practice.
  it("three, four and six cylinders four-stroke → 1.5, 2, 3 (Rahnejat et al. 2014; common practice)", () => {
    expect(firingOrder(3, 4)).toBe(1.5);
    expect(firingOrder(4, 4)).toBe(2);
    expect(firingOrder(6, 4)).toBe(3);
  });
  it("two-stroke fires z per revolution (common practice [memory])", () => {
    expect(firingOrder(2, 2)).toBe(2);
    expect(firingOrder(3, 2)).toBe(3);
  });
  it("refuses impossible cylinder counts", () => {
    expect(firingOrder(0)).toBeNull();
    expect(firingOrder(2.5)).toBeNull();
    expect(firingOrder(-4)).toBeNull();
  });
  it("firing frequency: 4-cyl at 800 rpm → 26.67 Hz, 6-cyl at 3000 rpm → 150 Hz (REFERENCES [computed]; 0.01 Hz)", () => {
    expect(orderFrequencyHz(800, firingOrder(4)!)).toBeCloseTo(26.67, 2);
    expect(orderFrequencyHz(3000, firingOrder(6)!)).toBeCloseTo(150, 10);
  });
  it("α = Δω·q·Ω: 10 rpm of order 2 at 800 rpm → 175.5 rad/s² (REFERENCES [computed]; ±0.05)", () => {
    expect(angularAccelerationRadS2(10 * RAD_S_PER_RPM, 2, 800 * RAD_S_PER_RPM)).toBeCloseTo(
      175.5,
      1,
    );
  });
});
