// The report of a press run as a PDF: the run's particulars and sampling, the spans to pull, the run chart (drawn
// as vector lines: drift ΔE00 and findings per inspected sheet with the profile's ΔE00 limit), the traceability
// table in sheet-number order, and each signed sheet in one line with its record hash. Read access as for the run.
import type { Actor } from "@/lib/auth/policy";
import { getRunView, type RunView } from "@/lib/run/traceability";
import { MEANING_LABELS, type SignatureMeaning } from "@/lib/review/signoff";
import { CAUTIONS, colours, MARGIN, ReportDocument, utc } from "./document";

export async function runReport(actor: Actor, jobId: number, revision?: number): Promise<{ bytes: Uint8Array; fileName: string }> {
  const run = await getRunView(actor, jobId, revision);
  const doc = await ReportDocument.create(`Press run report ${run.job.jobNumber} revision ${run.revision.revision}`, `Tympan · Press run report · Job ${run.job.jobNumber} · Artwork revision ${run.revision.revision}`);
  doc.text("Press run report", { size: 20, bold: true });
  doc.text(`Job ${run.job.jobNumber} · ${run.job.title} · ${run.job.customerName}`, { size: 11, colour: colours.muted });
  doc.gap(4);
  doc.fields([
    ["Artwork revision", `${run.revision.revision} · ${run.revision.fileName || "artwork PDF"} (${run.revision.status})`],
    ["Artwork sha256", run.revision.sha256],
    ["Run length", run.job.runLengthSheets ? `${run.job.runLengthSheets} sheets` : "not set"],
    ["Sampled", run.sampling],
    ["Tolerance profile", run.profile ? `${run.profile.label} (ΔE00 limit ${run.profile.deltaE00Threshold})` : "—"],
    ["Signed", `${run.sheets.filter((s) => s.verdict === "passed").length} passed, ${run.sheets.filter((s) => s.verdict === "failed").length} failed, ${run.sheets.filter((s) => s.verdict === "pending").length} not signed`],
  ]);

  doc.heading("Spans to pull");
  if (run.spans.length === 0) doc.text("No sheet of this run has been signed failed.");
  for (const span of run.spans) {
    doc.text(`Pull ${span.text}${span.sheets !== null ? ` (${span.sheets} sheets)` : ""} · failed: sheet ${span.failedSheets.join(", ")}`, { bold: true, colour: colours.danger });
  }
  doc.text("A span runs from the sheet after the last passed sheet before a failed one to the sheet before the next passed sheet after it.", { size: 8.5, colour: colours.muted });

  doc.heading("Run chart");
  drawChart(doc, run);

  doc.heading("Sheets by sheet number");
  doc.table(
    [
      { title: "Sheet", width: 40, align: "right" },
      { title: "Scan file / sha256", width: 130 },
      { title: "Inspected", width: 62 },
      { title: "Findings", width: 40, align: "right" },
      { title: "Rejected", width: 40, align: "right" },
      { title: "Verdict", width: 42 },
      { title: "Signed by / at", width: 80 },
      { title: "Span to pull", width: 77 },
    ],
    run.sheets.map((s) => ({
      cells: [
        String(s.sheetNumber ?? "—"),
        `${s.scanFileName} ${s.scanSha256}`,
        s.inspectedAt ? utc(s.inspectedAt) : (s.status ?? "not inspected"),
        s.status === "done" ? String(s.findings) : "—",
        s.status === "done" ? String(s.rejectedFindings) : "—",
        s.verdict,
        s.signedBy ? `${s.signedBy} ${utc(s.signedAt)}` : "—",
        s.spanToPull ?? "",
      ],
      colour: s.verdict === "failed" ? colours.danger : undefined,
    })),
    7.5,
  );

  doc.heading("Signed sheets");
  const signed = run.sheets.filter((s) => s.signedBy);
  if (signed.length === 0) doc.text("No sheet of this run has been signed off.");
  for (const s of signed) {
    doc.text(
      `Sheet ${s.sheetNumber ?? "without number"}: ${s.verdict.toUpperCase()} · ${s.signedBy}, ${s.signatureMeaning ? MEANING_LABELS[s.signatureMeaning as SignatureMeaning] : ""}, ${utc(s.signedAt)} · ${s.findings} findings, ${s.rejectedFindings} rejected · record sha256 ${s.recordSha256}`,
      { size: 8, colour: s.verdict === "failed" ? colours.danger : colours.ink },
    );
  }

  doc.heading("Cautions", 11);
  for (const c of CAUTIONS) doc.text(c, { size: 9 });
  const bytes = await doc.finish(`Generated ${utc(new Date())} by Tympan for ${actor.name}`);
  return { bytes, fileName: `${run.job.jobNumber.replace(/[^A-Za-z0-9._-]+/g, "_")}-r${run.revision.revision}-run-report.pdf` };
}

/** Drift ΔE00 (line, left axis) and findings (bars, right axis) per inspected sheet, the ΔE00 limit dashed. */
function drawChart(doc: ReportDocument, run: RunView) {
  const points = run.sheets.filter((s) => s.status === "done" && s.sheetNumber !== null);
  if (points.length === 0) {
    doc.text("No sheet of this run has been inspected yet.");
    return;
  }
  const height = 150;
  doc.need(height + 40);
  const left = MARGIN + 30, right = MARGIN + doc.contentWidth - 26, top = doc.y - 6, bottom = top - height;
  const page = doc.page, font = doc.font();
  const limit = run.profile?.deltaE00Threshold ?? null;
  const maxDrift = Math.ceil(Math.max(limit ?? 0, ...points.map((p) => p.driftDeltaE00 ?? 0)) + 0.5);
  const maxCount = Math.max(1, ...points.map((p) => p.findings));
  const step = (right - left) / points.length;
  const xAt = (i: number) => left + step * (i + 0.5);
  const yDrift = (v: number) => bottom + (v / maxDrift) * height;
  const yCount = (v: number) => bottom + (v / maxCount) * height;
  page.drawRectangle({ x: left, y: bottom, width: right - left, height, borderColor: colours.rule, borderWidth: 0.5 });
  for (let v = 0; v <= maxDrift; v += Math.max(1, Math.round(maxDrift / 5))) {
    page.drawLine({ start: { x: left, y: yDrift(v) }, end: { x: right, y: yDrift(v) }, thickness: 0.3, color: colours.rule });
    page.drawText(String(v), { x: left - 14, y: yDrift(v) - 3, size: 7, font, color: colours.muted });
  }
  page.drawText(String(maxCount), { x: right + 4, y: top - 3, size: 7, font, color: colours.accent });
  page.drawText("0", { x: right + 4, y: bottom - 3, size: 7, font, color: colours.accent });
  points.forEach((p, i) => {
    if (p.findings > 0) page.drawRectangle({ x: xAt(i) - Math.min(8, step * 0.3), y: bottom, width: Math.min(16, step * 0.6), height: yCount(p.findings) - bottom, color: colours.accent, opacity: 0.25 });
  });
  if (limit !== null) {
    page.drawLine({ start: { x: left, y: yDrift(limit) }, end: { x: right, y: yDrift(limit) }, thickness: 1, color: colours.danger, dashArray: [5, 3] });
    page.drawText(`limit ΔE00 ${limit}`, { x: right - 60, y: yDrift(limit) + 3, size: 7, font, color: colours.danger });
  }
  let previous: { x: number; y: number } | null = null;
  points.forEach((p, i) => {
    if (p.driftDeltaE00 === null) return;
    const at = { x: xAt(i), y: yDrift(p.driftDeltaE00) };
    if (previous) page.drawLine({ start: previous, end: at, thickness: 1.2, color: colours.ink });
    previous = at;
  });
  const labelEvery = Math.ceil(points.length / 20);
  points.forEach((p, i) => {
    if (p.driftDeltaE00 !== null) {
      if (p.repeatingFindings + p.everyUpFindings > 0) page.drawCircle({ x: xAt(i), y: yDrift(p.driftDeltaE00), size: 5.5, borderColor: colours.caution, borderWidth: 1.2 });
      page.drawCircle({ x: xAt(i), y: yDrift(p.driftDeltaE00), size: 3, color: p.verdict === "failed" ? colours.danger : p.verdict === "passed" ? colours.ok : colours.caution });
    }
    if (i % labelEvery === 0) page.drawText(String(p.sheetNumber), { x: xAt(i) - font.widthOfTextAtSize(String(p.sheetNumber), 7) / 2, y: bottom - 10, size: 7, font, color: colours.muted });
  });
  doc.y = bottom - 16;
  doc.text("Line and left axis: overall drift ΔE00 (indicative) · bars and right axis: findings · dashed: the profile's ΔE00 limit · dot colour: verdict (green passed, red failed, amber not signed) · ring: repeating or in-every-up findings · below: sheet numbers", { size: 7.5, colour: colours.muted });
}
