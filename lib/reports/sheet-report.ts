// The report of one sheet as a PDF: what was compared (artwork revision and scan, each with its sha256), how the
// scan was aligned and what it covered, the overall drift, every finding with its three close-ups, figures and
// decision, the signatures with their meaning, time and record hash, and the cautions. Read access as for the
// sheet itself (another customer's sheet is "not found").
import { eq, inArray } from "drizzle-orm";
import { db } from "@/db/client";
import { findings, toleranceProfiles } from "@/db/schema";
import { ROLE_LABELS, type Actor, type Role } from "@/lib/auth/policy";
import { loadSheetFor } from "@/lib/review/load";
import { getSheetView } from "@/lib/review/sheet";
import { MEANING_LABELS } from "@/lib/review/signoff";
import { getObjectBuffer } from "@/storage/objects";
import { CAUTIONS, colours, ReportDocument, utc } from "./document";
import { DECISION_WORDS, KIND_WORDS, RECURRENCE_WORDS, REASON_WORDS, VERDICT_WORDS } from "./words";

const f1 = (n: number | null | undefined, digits = 1) => (n === null || n === undefined ? "—" : n.toFixed(digits));
const mm = (um: number | null) => (um === null ? "—" : `${(um / 1000).toFixed(2)} mm`);

export async function sheetReport(actor: Actor, inspectionId: number): Promise<{ bytes: Uint8Array; fileName: string }> {
  const { inspection: i, scan, revision, job, customerName } = await loadSheetFor(actor, inspectionId, "inspection.read");
  const view = await getSheetView(actor, inspectionId);
  const [profile] = await db.select().from(toleranceProfiles).where(eq(toleranceProfiles.id, i.toleranceProfileId));
  const rows = view.findings.length ? await db.select().from(findings).where(inArray(findings.id, view.findings.map((f) => f.id))) : [];
  const sheetName = scan.sheetNumber === null ? "without number" : String(scan.sheetNumber);
  const doc = await ReportDocument.create(`Sheet report ${job.jobNumber} sheet ${sheetName}`, `Tympan · Sheet report · Job ${job.jobNumber} · Sheet ${sheetName}`);

  doc.text(`Sheet ${sheetName}`, { size: 20, bold: true });
  doc.text(`Job ${job.jobNumber} · ${job.title} · ${customerName}`, { size: 11, colour: colours.muted });
  doc.gap(6);
  doc.text(`Verdict: ${VERDICT_WORDS[i.verdict]}`, { size: 12, bold: true, colour: i.verdict === "failed" ? colours.danger : i.verdict === "passed" ? colours.ok : colours.caution });

  doc.heading("What was compared");
  doc.fields([
    ["Job number", job.jobNumber],
    ["Customer", customerName],
    ["Artwork revision", `${revision.revision} · ${revision.originalFilename || "artwork PDF"}`],
    ["Artwork sha256", revision.sourceSha256],
    ["Scan file", scan.originalFilename || "scan"],
    ["Scan sha256", scan.sha256],
    ["Sheet number", sheetName],
    ["Tolerance profile", profile ? `${profile.label} (ΔE00 limit ${profile.deltaE00Threshold}, registration ±${(profile.registrationToleranceUm / 1000).toFixed(2)} mm)` : "—"],
    ["Inspected", utc(i.finishedAt)],
  ]);

  doc.heading("Alignment and coverage");
  const covered = i.coveredWUm && i.coveredHUm ? (i.coveredWUm * i.coveredHUm) / (revision.pageWidthUm * revision.pageHeightUm) : null;
  doc.fields([
    ["Rotation", i.rotationDeg === null ? "—" : `${i.rotationDeg.toFixed(3)}°`],
    ["Scale", i.scale === null ? "—" : i.scale.toFixed(5)],
    ["Shift x / y", `${mm(i.txUm)} / ${mm(i.tyUm)}`],
    ["Fit residual", mm(i.residualUm)],
    ["Correlation", f1(i.correlation, 4)],
    [
      "Covered area",
      i.coveredWUm && i.coveredHUm
        ? `x ${mm(i.coveredXUm)}, y ${mm(i.coveredYUm)}, ${mm(i.coveredWUm)} × ${mm(i.coveredHUm)} (${Math.round((covered ?? 0) * 100)} % of the page)`
        : "—",
    ],
    ["Overall drift", i.driftDeltaE00 === null ? "—" : `ΔE00 ${i.driftDeltaE00.toFixed(2)} (indicative)`],
  ]);

  doc.heading(`Findings (${view.findings.length})`);
  if (view.findings.length === 0) doc.text("No differences from the approved artwork were found on this sheet.");
  for (const f of view.findings) {
    const row = rows.find((r) => r.id === f.id);
    // A finding's heading, close-ups and figures stay on one page.
    doc.need(230);
    doc.gap(4);
    doc.text(`Finding ${f.number}: ${KIND_WORDS[f.kind]}${f.up ? `, up ${f.up}` : ", outside the ups"}${f.recurrence && f.recurrence !== "isolated" ? ` · ${RECURRENCE_WORDS[f.recurrence]}` : ""}`, { size: 10.5, bold: true });
    const crops = row ? await cropImages(doc, [row.cropArtworkKey, row.cropScanKey, row.cropDifferenceKey]) : [];
    if (crops.some(Boolean)) {
      const side = 110;
      doc.need(side + 16);
      ["Artwork", "Scan", "Difference"].forEach((label, n) => {
        const x = 42 + n * (side + 10);
        const image = crops[n];
        doc.page.drawRectangle({ x, y: doc.y - side, width: side, height: side, borderColor: colours.rule, borderWidth: 0.5, color: colours.paper });
        if (image) {
          const scale = Math.min(side / image.width, side / image.height);
          const w = image.width * scale, h = image.height * scale;
          doc.page.drawImage(image, { x: x + (side - w) / 2, y: doc.y - side + (side - h) / 2, width: w, height: h });
        }
        doc.page.drawText(label, { x, y: doc.y - side - 10, size: 7.5, font: doc.font(), color: colours.muted });
      });
      doc.y -= side + 16;
    }
    doc.fields([
      ["Position", `x ${f.xMm.toFixed(1)} mm, y ${f.yMm.toFixed(1)} mm from the trim box's top left`],
      ["Size", `${f.wMm.toFixed(1)} × ${f.hMm.toFixed(1)} mm (${f.areaMm2.toFixed(2)} mm²)`],
      ["ΔE00 mean / max", `${f1(f.deltaE00Mean)} / ${f1(f.deltaE00Max)} (indicative)`],
      [
        "Decision",
        `${DECISION_WORDS[f.decision]}${f.reason ? ` (${REASON_WORDS[f.reason]})` : ""}${f.decidedBy ? ` by ${f.decidedBy}` : ""}${f.decidedAt ? `, ${utc(f.decidedAt)}` : ""}`,
      ],
      ...(f.comment ? ([["Comment", f.comment]] as [string, string][]) : []),
      ...(f.prior ? ([["Run memory", `Suggested by the accepted finding on sheet ${f.prior.sheetNumber ?? "without number"}`]] as [string, string][]) : []),
    ]);
  }

  doc.heading("Signatures");
  if (view.signatures.length === 0) doc.text("This sheet has not been signed off.");
  for (const s of view.signatures) {
    doc.need(60);
    doc.fields([
      ["Signed by", `${s.signerName} (${ROLE_LABELS[s.signerRole as Role] ?? s.signerRole})`],
      ["Meaning", `${MEANING_LABELS[s.meaning]} · verdict ${s.verdict}`],
      ["Time", utc(s.signedAt)],
      ["Record sha256", s.recordSha256],
      ["Record now", s.reopenedAt ? `Reopened ${utc(s.reopenedAt)} by ${s.reopenedBy ?? "an administrator"}: ${s.reopenReason ?? ""}` : s.intact ? "Unchanged since signing" : "CHANGED since signing"],
    ]);
    doc.gap(4);
  }

  doc.heading("Cautions", 11);
  for (const c of CAUTIONS) doc.text(c, { size: 9 });
  const bytes = await doc.finish(`Generated ${utc(new Date())} by Tympan for ${actor.name}`);
  const safe = job.jobNumber.replace(/[^A-Za-z0-9._-]+/g, "_");
  return { bytes, fileName: `${safe}-sheet-${sheetName.replace(/\s+/g, "-")}.pdf` };
}

async function cropImages(doc: ReportDocument, keys: (string | null)[]) {
  return Promise.all(
    keys.map(async (key) => {
      if (!key) return null;
      try {
        return await doc.image(new Uint8Array(await getObjectBuffer(key)));
      } catch {
        // A missing or damaged close-up leaves its frame empty; the figures stay.
        return null;
      }
    }),
  );
}
