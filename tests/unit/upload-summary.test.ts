import { describe, expect, it } from "vitest";
import { failuresFirst, uploadSummary } from "@/components/uploads/summary";
import { counted } from "@/lib/format";

/** The upload panel's summary line (cases from the panel's bugs: "7 uploading, 3 uploading", "1 spectra"). */
describe("uploadSummary", () => {
  it("names each label once, pending and uploading together, failures first", () => {
    const statuses = [...Array(7).fill("uploading"), ...Array(3).fill("pending"), "done", "failed", "error", "queued"];
    expect(uploadSummary(statuses)).toBe("14 files: 2 failed, 10 uploading, 1 queued, 1 done");
  });
  it("says file and spectrum in the singular for one", () => {
    expect(uploadSummary(["done"])).toBe("1 file: 1 done");
    expect(counted(1, "spectrum", "spectra")).toBe("1 spectrum");
    expect(counted(2, "spectrum", "spectra")).toBe("2 spectra");
  });
  it("lists failed rows first and keeps the others in their order", () => {
    const rows = [{ status: "done", n: 1 }, { status: "failed", n: 2 }, { status: "queued", n: 3 }, { status: "error", n: 4 }];
    expect(failuresFirst(rows).map((r) => r.n)).toEqual([2, 4, 1, 3]);
  });
});
