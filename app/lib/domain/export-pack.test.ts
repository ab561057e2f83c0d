import { describe, expect, it } from "vitest";
import { logFolder, packFileName, packReadme, parseExportQuery } from "./export-pack";

describe("the pack's names", () => {
  it("a drive log's folder keeps the id and a safe stem of the file name", () => {
    expect(logFolder(12, "kestrel-run-up-3.csv")).toBe("logs/12-kestrel-run-up-3");
    expect(logFolder(7, "Run up 3 (warm).MF4")).toBe("logs/7-Run-up-3-warm");
    // Nothing that climbs out of the folder, starts an option or a formula, or is empty.
    expect(logFolder(3, "../../etc/passwd")).toBe("logs/3-etc-passwd");
    expect(logFolder(4, "=HYPERLINK(x).csv")).toBe("logs/4-HYPERLINK-x");
    expect(logFolder(5, "-rf .csv")).toBe("logs/5-rf");
    expect(logFolder(6, "日本語.csv")).toBe("logs/6-drive-log");
    expect(logFolder(8, "a".repeat(300) + ".csv")).toBe(`logs/8-${"a".repeat(60)}`);
  });

  it("the download is named after the vehicle, the variant and the day (UTC)", () => {
    const at = new Date("2026-12-02T23:30:00Z");
    expect(packFileName("KST-D4", at)).toBe("KST-D4-export-2026-12-02.zip");
    expect(packFileName("KST-D4", at, "B")).toBe("KST-D4-B-export-2026-12-02.zip");
    expect(packFileName("FLEET 12/a", at, "+B")).toBe("FLEET-12-a-B-export-2026-12-02.zip");
  });
});

describe("the query", () => {
  const q = (s: string) => parseExportQuery(new URLSearchParams(s));
  it("takes an optional damper variant, trimmed", () => {
    expect(q("")).toEqual({ ok: true, query: {} });
    expect(q("damperVariant=%20B%20")).toEqual({ ok: true, query: { damperVariant: "B" } });
  });
  it("refuses an empty, long, repeated or unknown parameter with a message that says what to do", () => {
    expect(q("damperVariant=")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/leave it out/),
    });
    expect(q(`damperVariant=${"x".repeat(81)}`)).toMatchObject({
      ok: false,
      message: expect.stringMatching(/80/),
    });
    expect(q("damperVariant=A&damperVariant=B")).toMatchObject({
      ok: false,
      message: expect.stringMatching(/once/),
    });
    expect(q("variant=A")).toEqual({
      ok: false,
      message: 'Unknown query parameter "variant": the export takes damperVariant only.',
    });
  });
});

describe("the README", () => {
  const head = {
    format: "twistlog-export/1" as const,
    generatedAt: "2026-12-02T10:00:00.000Z",
    software: "twistlog 0.1.0",
    vehicle: { id: 1, name: "Kestrel estate", identifier: "KST-D4", damperVariant: "A" },
    damperVariant: null,
  };
  it("says when there is nothing analysed", () => {
    const text = packReadme({ ...head, logs: [], skipped: [] }, "KST-D4-export-2026-12-02.zip");
    expect(text).toContain("**No analysed drive logs**");
    expect(text).toContain('zipfile.ZipFile("KST-D4-export-2026-12-02.zip")');
  });
  it("points its pandas example at the first exported drive log", () => {
    const log = {
      logId: 12,
      folder: "logs/12-run-up",
      fileName: "run-up.csv",
      damperVariant: "A",
      analysisId: 3,
      analysisVersion: 1,
      firingOrder: 3,
    };
    const text = packReadme({ ...head, logs: [log], skipped: [] }, "x.zip");
    expect(text).toContain('pd.read_csv(z.open("logs/12-run-up/isolation.csv"))');
    expect(text).toContain('curves[curves["order"] == 3]');
    expect(text).toContain("1 analysed drive log (all damper variants)");
  });
});
