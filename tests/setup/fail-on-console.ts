import { afterEach, beforeEach, vi } from "vitest";

// A console error or warning during a test fails that test (docs/conventions.md, Tests).
let messages: string[] = [];

beforeEach(() => {
  messages = [];
  for (const level of ["error", "warn"] as const) {
    vi.spyOn(console, level).mockImplementation((...args: unknown[]) => {
      messages.push(`console.${level}: ${args.map(String).join(" ")}`);
    });
  }
});

afterEach(() => {
  vi.restoreAllMocks();
  if (messages.length > 0) {
    throw new Error(`Unexpected console output:\n${messages.join("\n")}`);
  }
});
