// The words of Tympan's e-mails. Plain text first (every client shows it), with a link straight into the job.
import { env } from "@/lib/env";

export interface SheetMailContext {
  jobId: number;
  jobNumber: string;
  jobTitle: string;
  customerName: string;
  inspectionId: number;
  sheetNumber: number | null;
  findingsCount: number;
  errorMessage?: string | null;
  /** For a sheet signed failed: the sheets to pull from the delivery, in words, with their count. */
  spanToPull?: string | null;
}

export interface Message {
  subject: string;
  text: string;
}

export const jobLink = (jobId: number, inspectionId?: number) =>
  new URL(`/jobs/${jobId}${inspectionId ? `#inspection-${inspectionId}` : ""}`, env.APP_URL).toString();

const appLink = (path: string) => new URL(path, env.APP_URL).toString();

const sheetName = (c: SheetMailContext) => (c.sheetNumber === null ? "a sheet without a number" : `sheet ${c.sheetNumber}`);
const caution =
  "Colour figures come from a flatbed scan and are indicative only; a spectrophotometer decides. " +
  "Sign-off stays with qualified staff under the customer's rules.";

export function sheetReadyMessage(c: SheetMailContext): Message {
  const found =
    c.findingsCount === 0
      ? "The inspection found no differences from the approved artwork."
      : `The inspection marked ${c.findingsCount} difference${c.findingsCount === 1 ? "" : "s"} from the approved artwork for you to accept or reject.`;
  return {
    subject: `Ready for review: ${c.jobNumber}, ${sheetName(c)}`,
    text: [
      `${sheetName(c)[0].toUpperCase()}${sheetName(c).slice(1)} of job ${c.jobNumber} (${c.jobTitle}, ${c.customerName}) is ready for review.`,
      "",
      found,
      "",
      `Open the job: ${jobLink(c.jobId, c.inspectionId)}`,
      "",
      caution,
    ].join("\n"),
  };
}

export function sheetFailedMessage(c: SheetMailContext, reason: "inspection_failed" | "verdict_failed"): Message {
  const what =
    reason === "inspection_failed"
      ? `The inspection of ${sheetName(c)} could not be completed.`
      : `${sheetName(c)[0].toUpperCase()}${sheetName(c).slice(1)} was signed off as failed.`;
  return {
    subject: `Sheet needs attention: ${c.jobNumber}, ${sheetName(c)}`,
    text: [
      `${what} Job ${c.jobNumber} (${c.jobTitle}, ${c.customerName}).`,
      ...(c.errorMessage ? ["", `Reason: ${c.errorMessage}`] : []),
      "",
      reason === "inspection_failed"
        ? "QA can fix the cause and press Retry on the job page."
        : c.spanToPull
          ? `Pull from the delivery: ${c.spanToPull}. Please check the press and the pulled sheets.`
          : "Please check the press and the pulled sheets.",
      ...(reason === "verdict_failed" ? ["", `The press run: ${appLink(`/jobs/${c.jobId}/run`)}`] : []),
      "",
      `Open the job: ${jobLink(c.jobId, c.inspectionId)}`,
    ].join("\n"),
  };
}

export interface SignedMailContext extends SheetMailContext {
  verdict: "passed" | "failed";
  meaning: string;
  signerName: string;
  signerRole: string;
  signedAtUtc: string;
  rejectedCount: number;
  recordSha256: string;
}

export function sheetSignedMessage(c: SignedMailContext): Message {
  const name = sheetName(c);
  return {
    subject: `Sheet ${c.verdict}: ${c.jobNumber}, ${name}`,
    text: [
      `${name[0].toUpperCase()}${name.slice(1)} of job ${c.jobNumber} (${c.jobTitle}, ${c.customerName}) was signed off as ${c.verdict.toUpperCase()}.`,
      "",
      `Signed by ${c.signerName} (${c.signerRole}) as “${c.meaning}” at ${c.signedAtUtc} UTC.`,
      `${c.findingsCount} finding${c.findingsCount === 1 ? "" : "s"} decided, ${c.rejectedCount} rejected as defects.`,
      `Record fingerprint (sha256): ${c.recordSha256}`,
      "",
      `Open the sheet: ${appLink(`/jobs/${c.jobId}/sheets/${c.inspectionId}`)}`,
      `Sheet report (PDF): ${appLink(`/api/v1/inspections/${c.inspectionId}/report.pdf`)}`,
      `The press run: ${appLink(`/jobs/${c.jobId}/run`)}`,
      "",
      caution,
    ].join("\n"),
  };
}
