// Checks an upload while it streams, before any of it counts as stored: size limit (stops at the first byte
// over), type from the content, declared pixel size, and for PDFs a complete file and no scripts.
import { Transform, type TransformCallback } from "node:stream";
import { AppError } from "@/lib/errors";
import {
  SNIFF_BYTES,
  allowedTypes,
  declaredPixels,
  detectType,
  expectedTypeName,
  type DetectedType,
  type UploadKind,
} from "./file-types";

export interface GateLimits {
  maxBytes: number;
  /** Largest image a scan may declare (width × height). */
  maxPixels: number;
}

const MB = 1024 * 1024;
// "/JavaScript" or "/JS" as a PDF name (ISO 32000-1 §12.6.4.16), followed by a delimiter so "/JSON" does not count.
const pdfScript = /\/(?:JavaScript|JS)[\s/<>[\]()]/;
const OVERLAP = 16;

export class FileGate extends Transform {
  type: DetectedType | null = null;
  bytes = 0;
  private head: Buffer[] = [];
  private headBytes = 0;
  private tail = Buffer.alloc(0);

  constructor(
    private readonly kind: UploadKind,
    private readonly fileName: string,
    private readonly limits: GateLimits,
  ) {
    super();
  }

  override _transform(chunk: Buffer, _enc: BufferEncoding, done: TransformCallback): void {
    this.bytes += chunk.length;
    if (this.bytes > this.limits.maxBytes) {
      const limit = Math.floor(this.limits.maxBytes / MB);
      return done(
        new AppError("file_too_large", `“${this.fileName}” is larger than the ${limit} MB allowed for one file.`, 413),
      );
    }
    try {
      if (this.type === null) {
        // Hold the first bytes back until the type is known, so nothing of a refused file reaches storage.
        this.head.push(chunk);
        this.headBytes += chunk.length;
        if (this.headBytes < SNIFF_BYTES) return done();
        this.decide();
        const held = Buffer.concat(this.head);
        this.head = [];
        this.scanForScript(held);
        return done(null, held);
      }
      this.scanForScript(chunk);
      done(null, chunk);
    } catch (error) {
      done(error as Error);
    }
  }

  override _flush(done: TransformCallback): void {
    try {
      if (this.bytes === 0) {
        throw new AppError("empty_file", `“${this.fileName}” is empty (0 bytes). Please choose the file again.`, 400);
      }
      if (this.type === null) {
        this.decide();
        const held = Buffer.concat(this.head);
        this.head = [];
        this.scanForScript(held);
        this.push(held);
      }
      if (this.type === "pdf" && !this.tail.includes("%%EOF")) {
        throw new AppError(
          "pdf_truncated",
          `“${this.fileName}” is not a complete PDF: its end is missing. Export or copy it again and upload the whole file.`,
          422,
        );
      }
      done();
    } catch (error) {
      done(error as Error);
    }
  }

  private decide(): void {
    const head = Buffer.concat(this.head);
    const type = detectType(head);
    if (!type || !allowedTypes[this.kind].includes(type)) {
      throw new AppError(
        "unsupported_type",
        `“${this.fileName}” is not ${expectedTypeName(this.kind)} (judged from its content, not its name).`,
        415,
      );
    }
    this.type = type;
    const size = declaredPixels(type, head);
    if (size && (size.width === 0 || size.height === 0 || size.width * size.height > this.limits.maxPixels)) {
      throw new AppError(
        "image_too_large",
        `“${this.fileName}” declares ${size.width} × ${size.height} pixels; at most ${Math.round(this.limits.maxPixels / 1e6)} million pixels are accepted. Scan at a lower resolution.`,
        422,
      );
    }
  }

  /** Refuse artwork that carries scripts: printing never needs them, and refusing is clearer than stripping. */
  private scanForScript(chunk: Buffer): void {
    if (this.type !== "pdf") return;
    const window = Buffer.concat([this.tail, chunk]);
    if (pdfScript.test(window.toString("latin1"))) {
      throw new AppError(
        "pdf_has_script",
        `“${this.fileName}” contains JavaScript. Artwork PDFs with scripts are refused; export the artwork again without scripts or actions.`,
        422,
      );
    }
    // Keep enough of the end for the next chunk's boundary and for the %%EOF check (ISO 32000-1 §7.5.5).
    this.tail = window.subarray(Math.max(0, window.length - Math.max(OVERLAP, 1024)));
  }
}
