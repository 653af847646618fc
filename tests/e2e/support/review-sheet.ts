// An inspected press sheet for the browser story, made the way the worker makes one but in the test process:
// an invented two-up carton drawn as SVG (artwork) and the same carton with three defects and a short scan (the
// sheet's right edge missed), run through the real engine (inspectSheet, already aligned), its findings and
// close-ups stored with the pipeline's own functions, and the zoom tiles cut by the worker's tiles module.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import sharp from "sharp";
import { db } from "@/db/client";
import { artworkRevisions, customers, inspections, jobs, scans, toleranceProfiles, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import type { Actor, Role } from "@/lib/auth/policy";
import { identityAlignment, inspectSheet } from "@/lib/imaging/inspect";
import type { ArtworkRaster } from "@/lib/imaging/types";
import { profileOf, saveInspectionResult, type StoredCrops } from "@/lib/pipeline/records";
import { keys, newObjectId } from "@/storage/keys";
import { ensureBucket, putObject } from "@/storage/objects";
import { buildTiles } from "@/worker/processors/tiles";
import { ensureProfiles } from "../../pipeline/support/fixtures";

const DPI = 150;
const PAGE = { w: 220, h: 130 }; // mm
const px = (mm: number) => Math.round((mm * DPI) / 25.4);

function carton(x: number, defects: boolean, up: number): string {
  const d = defects
    ? up === 1
      ? `<circle cx="${x + 62}" cy="40" r="1.4" fill="#202020"/>`
      : `<rect x="${x + 24}" y="80" width="3" height="2.2" fill="#ffffff"/><rect x="${x + 60}" y="96" width="14" height="8" fill="#c99a2e"/>`
    : "";
  return `<g>
    <rect x="${x + 5}" y="8" width="95" height="114" rx="3" fill="#fbf6e8" stroke="#6b4b1f" stroke-width="0.6"/>
    <rect x="${x + 12}" y="16" width="81" height="20" fill="#2f5d8a"/>
    <text x="${x + 16}" y="30" font-family="DejaVu Sans" font-size="9" font-weight="bold" fill="#ffffff">HEATHERFORD</text>
    <rect x="${x + 12}" y="74" width="40" height="34" fill="#2f5d8a"/>
    <rect x="${x + 58}" y="94" width="34" height="12" fill="#e0b04a"/>
    <text x="${x + 12}" y="52" font-family="DejaVu Sans" font-size="5" fill="#3b2a12">Wildflower honey · 340 g</text>
    <text x="${x + 12}" y="62" font-family="DejaVu Sans" font-size="3" fill="#3b2a12">Best before: see base. Store dry.</text>
    ${d}
  </g>`;
}

async function render(defects: boolean, widthMm = PAGE.w): Promise<{ data: Uint8Array; width: number; height: number }> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${px(PAGE.w)}" height="${px(PAGE.h)}" viewBox="0 0 ${PAGE.w} ${PAGE.h}">
    <rect width="100%" height="100%" fill="#ffffff"/>${carton(5, defects, 1)}${carton(110, defects, 2)}</svg>`;
  const { data, info } = await sharp(Buffer.from(svg))
    .extract({ left: 0, top: 0, width: px(widthMm), height: px(PAGE.h) })
    .ensureAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true });
  return { data: new Uint8Array(data.buffer, data.byteOffset, data.length), width: info.width, height: info.height };
}

export interface StorySheet {
  jobId: number;
  jobNumber: string;
  inspectionId: number;
  findings: number;
  contacts: string[];
  people: Record<"reviewer" | "reviewer2" | "customer" | "otherCustomer", Actor>;
}

export async function makeStorySheet(password: string): Promise<StorySheet> {
  await ensureBucket();
  await ensureProfiles();
  const tag = randomUUID().slice(0, 6);
  const contacts = [`orders-${tag}@heatherford.example`];
  const [{ id: customerId }] = await db.insert(customers).values({ name: `Heatherford Apiaries ${tag}`, contactEmails: contacts }).$returningId();
  const [{ id: otherId }] = await db.insert(customers).values({ name: `Quillan Crispbread ${tag}` }).$returningId();
  const jobNumber = `HF-${tag}`;
  const [{ id: jobId }] = await db.insert(jobs).values({ customerId, jobNumber, title: "Wildflower honey 340 g, folding carton", upsRows: 1, upsColumns: 2, artworkDpi: DPI }).$returningId();
  const [{ id: revisionId }] = await db
    .insert(artworkRevisions)
    .values({ jobId, revision: 1, sourceKey: `artwork-sources/${tag}.pdf`, sourceSha256: "a".repeat(64), originalFilename: "honey-carton-r1.pdf", pageWidthUm: PAGE.w * 1000, pageHeightUm: PAGE.h * 1000, upsRows: 1, upsColumns: 2, upsAreaXUm: 5000, upsAreaYUm: 0, upsAreaWUm: 210_000, upsAreaHUm: 130_000, status: "approved", approvedAt: new Date(), rasterStatus: "ready", rasterDpi: DPI })
    .$returningId();
  const [{ id: scanId }] = await db
    .insert(scans)
    .values({ jobId, artworkRevisionId: revisionId, sheetNumber: 4127, objectKey: `scans/${tag}.png`, sha256: "b".repeat(64), dpi: DPI, byteSize: 1, originalFilename: "sheet-4127.png" })
    .$returningId();
  const [profile] = await db.select().from(toleranceProfiles).where(eq(toleranceProfiles.name, "standard-food"));
  const [{ id: inspectionId }] = await db.insert(inspections).values({ scanId, artworkRevisionId: revisionId, toleranceProfileId: profile.id, status: "running" }).$returningId();

  const art = await render(false);
  const artwork: ArtworkRaster = { ...art, dpi: DPI, widthMm: PAGE.w, heightMm: PAGE.h, box: "TrimBox" };
  const scanImage = await render(true, PAGE.w - 12);
  const scan = { ...scanImage, dpi: DPI, dpiSource: "caller" as const };
  const alignment = identityAlignment(artwork, scan);
  const result = await inspectSheet({ artwork, scan, profile: profileOf(profile), ups: { rows: 1, columns: 2, areaMm: { x: 5, y: 0, w: 210, h: 130 } }, crops: true, alignment });
  const crops: (StoredCrops | null)[] = [];
  for (const f of result.findings) {
    if (!f.crops) {
      crops.push(null);
      continue;
    }
    const id = newObjectId();
    const stored = { artwork: keys.crop(String(inspectionId), id, "artwork"), scan: keys.crop(String(inspectionId), id, "scan"), difference: keys.crop(String(inspectionId), id, "difference") };
    await Promise.all([putObject(stored.artwork, f.crops.artwork, "image/png"), putObject(stored.scan, f.crops.scan, "image/png"), putObject(stored.difference, f.crops.difference, "image/png")]);
    crops.push(stored);
  }
  await saveInspectionResult(inspectionId, result, crops);
  await buildTiles(inspectionId, { artwork, scan, alignment });

  const passwordHash = await hashPassword(password);
  const people = {} as StorySheet["people"];
  const roles: [keyof StorySheet["people"], Role, number | null, string][] = [
    ["reviewer", "reviewer", null, "Oriel Vantongeren"],
    ["reviewer2", "reviewer", null, "Bede Marchbank"],
    ["customer", "customer", customerId, "Saffi Trelawn"],
    ["otherCustomer", "customer", otherId, "Jory Pellow"],
  ];
  for (const [key, role, customer, name] of roles) {
    const email = `${key.toLowerCase()}-${tag}@story.example`;
    const [{ id }] = await db.insert(users).values({ email, name, role, customerId: customer, passwordHash }).$returningId();
    people[key] = { id, role, customerId: customer, name, email };
  }
  return { jobId, jobNumber, inspectionId, findings: result.findings.length, contacts, people };
}
