// The report layout's label–value block keeps a sha256 on one line, whatever its digits: a SHA-256 digest is
// 256 bits, 64 hexadecimal digits (NIST FIPS 180-4), and a hash split over two lines can be neither read nor
// searched whole. Each hex digit repeated 64 times covers the widest hash the shipped font can draw.
import { describe, expect, it } from "vitest";
import { FIELD_LABEL_WIDTH, ReportDocument } from "@/lib/reports/document";

describe("report fields", () => {
  it("fit a sha256 of any digits on one line beside the label column, and the longest label in its column", async () => {
    const doc = await ReportDocument.create("Fields", "Tympan · test");
    for (const digit of "0123456789abcdef") expect(doc.wrap(digit.repeat(64), doc.contentWidth - FIELD_LABEL_WIDTH)).toHaveLength(1);
    expect(doc.wrap("ΔE00 mean / max", FIELD_LABEL_WIDTH - 10)).toHaveLength(1);
  });
});
