import "./support/test-env";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { PDFDocument } from "pdf-lib";
import { receiveUpload, type ReceiveOptions } from "@/lib/uploads/receive";
import { ensureBucket, getObjectBuffer, listKeys } from "@/storage/objects";
import { pngHeaderClaiming, smallPng } from "./support/files";

const run = `upload-tests/${randomUUID()}/`;
const options = (over: Partial<ReceiveOptions> = {}): ReceiveOptions => ({
  kind: "scan",
  maxBytes: 5 * 1024 * 1024,
  maxPixels: 300e6,
  maxFiles: 10,
  keyFor: (type) => `${run}${randomUUID()}.${type}`,
  ...over,
});

function multipart(files: { name: string; data: Uint8Array | Buffer }[], fields: Record<string, string> = {}) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.append(k, v);
  for (const f of files) form.append("file", new Blob([new Uint8Array(f.data)]), f.name);
  return new Request("http://localhost/api/uploads", { method: "POST", body: form });
}

async function refusal(promise: Promise<unknown>) {
  try {
    await promise;
  } catch (error) {
    return error as { status: number; code: string; message: string };
  }
  throw new Error("expected the upload to be refused");
}

describe("receiving uploads (route handler Request → storage)", () => {
  beforeAll(() => ensureBucket());

  it("stores a PNG byte-identical with its sha256 and keeps the field values", async () => {
    const png = await smallPng();
    const got = await receiveUpload(multipart([{ name: "sheet-0217.png", data: png }], { sheetNumber: "217" }), options());
    expect(got.fields).toEqual({ sheetNumber: "217" });
    expect(got.files).toHaveLength(1);
    const [file] = got.files;
    expect(file.type).toBe("png");
    expect(file.fileName).toBe("sheet-0217.png");
    expect(file.key.startsWith(run)).toBe(true);
    expect(file.sha256).toBe(createHash("sha256").update(png).digest("hex"));
    expect((await getObjectBuffer(file.key)).equals(png)).toBe(true);
    await got.discard();
    expect(await listKeys(run)).toEqual([]);
  });

  it("takes several files at once", async () => {
    const png = await smallPng();
    const got = await receiveUpload(
      multipart([
        { name: "a.png", data: png },
        { name: "b.png", data: Buffer.concat([png]) },
      ]),
      options(),
    );
    expect(got.files.map((f) => f.fileName)).toEqual(["a.png", "b.png"]);
    await got.discard();
  });

  it("refuses a text file named .tif with 415, judged from content", async () => {
    const e = await refusal(receiveUpload(multipart([{ name: "sheet-1.tif", data: Buffer.from("hello, not a scan\n") }]), options()));
    expect([e.status, e.code]).toEqual([415, "unsupported_type"]);
    expect(e.message).toContain("sheet-1.tif");
  });

  it("refuses a zero-byte file", async () => {
    const e = await refusal(receiveUpload(multipart([{ name: "empty.png", data: Buffer.alloc(0) }]), options()));
    expect([e.status, e.code]).toEqual([400, "empty_file"]);
  });

  it("refuses a file over the limit with 413 and leaves no object, also for the good file beside it", async () => {
    const png = await smallPng();
    const big = Buffer.concat([png, randomBytes(6 * 1024 * 1024)]);
    const e = await refusal(
      receiveUpload(multipart([{ name: "ok.png", data: png }, { name: "big.png", data: big }]), options()),
    );
    expect([e.status, e.code]).toEqual([413, "file_too_large"]);
    expect(await listKeys(run)).toEqual([]);
  });

  it("refuses a PNG whose header claims 100 000 × 100 000 px", async () => {
    const e = await refusal(receiveUpload(multipart([{ name: "huge.png", data: pngHeaderClaiming(100_000, 100_000) }]), options()));
    expect([e.status, e.code]).toEqual([422, "image_too_large"]);
    expect(e.message).toContain("100000 × 100000");
  });

  it("refuses a truncated PDF and a PDF with embedded JavaScript", async () => {
    const doc = await PDFDocument.create();
    doc.addPage([200, 200]);
    const pdf = Buffer.from(await doc.save({ useObjectStreams: false }));
    const truncated = pdf.subarray(0, Math.floor(pdf.length / 2));
    const e1 = await refusal(receiveUpload(multipart([{ name: "art.pdf", data: truncated }]), options({ kind: "artwork" })));
    expect([e1.status, e1.code]).toEqual([422, "pdf_truncated"]);

    doc.addJavaScript("hello", "app.alert('hi');");
    const scripted = Buffer.from(await doc.save({ useObjectStreams: false }));
    const e2 = await refusal(receiveUpload(multipart([{ name: "art.pdf", data: scripted }]), options({ kind: "artwork" })));
    expect([e2.status, e2.code]).toEqual([422, "pdf_has_script"]);

    const ok = await receiveUpload(multipart([{ name: "art.pdf", data: pdf }]), options({ kind: "artwork" }));
    expect(ok.files[0].type).toBe("pdf");
    await ok.discard();
    // A PNG is not artwork.
    const e3 = await refusal(receiveUpload(multipart([{ name: "art.pdf", data: await smallPng() }]), options({ kind: "artwork" })));
    expect(e3.status).toBe(415);
    expect(await listKeys(run)).toEqual([]);
  });
});
