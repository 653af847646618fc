// What an uploaded file is, judged from its first bytes (the name and the browser's claimed type are ignored).
// Signatures: PDF "%PDF-" (ISO 32000-1 §7.5.2, may follow up to 1024 bytes of junk in practice, common practice),
// TIFF "II*\0" / "MM\0*" (TIFF 6.0 §2) and BigTIFF version 43, PNG 89 50 4E 47 0D 0A 1A 0A (ISO/IEC 15948 §5.2),
// JPEG SOI FF D8 FF (ITU-T T.81 Annex B).
export type UploadKind = "artwork" | "scan";
export type DetectedType = "pdf" | "tif" | "png" | "jpg";

export const contentTypes: Record<DetectedType, string> = {
  pdf: "application/pdf",
  tif: "image/tiff",
  png: "image/png",
  jpg: "image/jpeg",
};

export const allowedTypes: Record<UploadKind, readonly DetectedType[]> = {
  artwork: ["pdf"],
  scan: ["tif", "png", "jpg"],
};

/** Bytes needed before a verdict: enough for a PDF header after junk and a JPEG frame header after EXIF. */
export const SNIFF_BYTES = 64 * 1024;

export function detectType(head: Buffer): DetectedType | null {
  if (head.length >= 8 && head.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))) {
    return "png";
  }
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return "jpg";
  if (head.length >= 4) {
    const le = head[0] === 0x49 && head[1] === 0x49 && head[3] === 0x00 && (head[2] === 42 || head[2] === 43);
    const be = head[0] === 0x4d && head[1] === 0x4d && head[2] === 0x00 && (head[3] === 42 || head[3] === 43);
    if (le || be) return "tif";
  }
  if (head.subarray(0, 1024).includes("%PDF-")) return "pdf";
  return null;
}

/**
 * Pixel size declared in the header, when it is cheap to read from the first bytes (PNG IHDR, JPEG SOFn).
 * TIFF keeps its sizes in an IFD that may sit at the end of the file: the worker's decoder bounds those.
 */
export function declaredPixels(type: DetectedType, head: Buffer): { width: number; height: number } | null {
  if (type === "png" && head.length >= 24 && head.toString("latin1", 12, 16) === "IHDR") {
    return { width: head.readUInt32BE(16), height: head.readUInt32BE(20) };
  }
  if (type === "jpg") {
    let at = 2;
    while (at + 9 < head.length) {
      if (head[at] !== 0xff) return null;
      const marker = head[at + 1];
      // Start-of-frame markers C0–CF, except DHT (C4), JPG (C8) and DAC (CC).
      if (marker >= 0xc0 && marker <= 0xcf && marker !== 0xc4 && marker !== 0xc8 && marker !== 0xcc) {
        return { height: head.readUInt16BE(at + 5), width: head.readUInt16BE(at + 7) };
      }
      at += 2 + head.readUInt16BE(at + 2);
    }
  }
  return null;
}

const typeNames: Record<UploadKind, string> = { artwork: "a PDF", scan: "a TIFF, PNG or JPEG image" };
export const expectedTypeName = (kind: UploadKind) => typeNames[kind];
