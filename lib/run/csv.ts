// The traceability table of a press run as CSV (RFC 4180: comma-separated, CRLF line ends, a header row, fields
// holding a comma, quote or line break quoted with their quotes doubled), UTF-8. Written by csv-stringify.
import { stringify } from "csv-stringify/sync";
import type { RunView } from "./traceability";

export const CSV_HEADER = [
  "sheet number",
  "scan file",
  "scan sha256",
  "inspected at",
  "findings",
  "rejected findings",
  "verdict",
  "signed by",
  "signed at",
  "span to pull",
] as const;

/**
 * A spreadsheet runs a cell that starts with = + - @ (or a tab or carriage return) as a formula; file names and
 * names come from users, so such a cell gets a leading apostrophe (OWASP, "CSV Injection").
 */
export function inert(text: string): string {
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

export function runCsv(run: RunView): string {
  const rows = run.sheets.map((s) => [
    s.sheetNumber ?? "",
    inert(s.scanFileName),
    s.scanSha256,
    s.inspectedAt ?? "",
    s.status === "done" ? s.findings : "",
    s.status === "done" ? s.rejectedFindings : "",
    s.status === "done" || s.verdict !== "pending" ? s.verdict : (s.status ?? "not inspected"),
    inert(s.signedBy ?? ""),
    s.signedAt ?? "",
    s.spanToPull ?? "",
  ]);
  return stringify([[...CSV_HEADER], ...rows], { record_delimiter: "windows", quoted_match: /[\r\n]/ });
}

export const csvFileName = (run: RunView) => `${run.job.jobNumber.replace(/[^A-Za-z0-9._-]+/g, "_")}-r${run.revision.revision}-sheets.csv`;
