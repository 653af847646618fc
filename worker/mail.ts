// Sends the pipeline's e-mails from their own queue, so a mail outage only delays mail (with retries) and
// never holds up an inspection.
import type { Job } from "bullmq";
import { env } from "@/lib/env";
import { mailTransport } from "@/lib/mail/transport";
import { sheetFailedMessage, sheetReadyMessage, sheetSignedMessage, type SheetMailContext } from "@/lib/mail/messages";
import { signedMail } from "@/lib/review/signed-mail";
import { countFindings, loadInspectionWork, usersWithRoles } from "@/lib/pipeline/records";
import type { MailData } from "@/lib/queue/queues";
import { spanToPullOf } from "@/lib/run/traceability";

export async function sendPipelineMail(job: Job<MailData>): Promise<{ sent: number }> {
  const data = job.data;
  const work = await loadInspectionWork(data.inspectionId);
  if (!work) return { sent: 0 };
  const context: SheetMailContext = {
    jobId: work.job.id,
    jobNumber: work.job.jobNumber,
    jobTitle: work.job.title,
    customerName: work.customerName,
    inspectionId: work.inspection.id,
    sheetNumber: work.scan.sheetNumber,
    findingsCount: 0,
    errorMessage: work.inspection.errorMessage,
  };
  let message;
  let recipients;
  if (data.kind === "sheet_signed") {
    const signed = await signedMail(context, data.signoffId, work.job.customerId);
    if (!signed) return { sent: 0 };
    message = sheetSignedMessage(signed.context);
    recipients = signed.recipients;
  } else if (data.kind === "sheet_ready") {
    context.findingsCount = await countFindings(work.inspection.id);
    message = sheetReadyMessage(context);
    // There is no per-customer reviewer assignment yet: every active reviewer is told.
    recipients = await usersWithRoles(["reviewer"]);
  } else {
    if (data.reason === "verdict_failed") context.spanToPull = await spanToPullOf(work.inspection.id);
    message = sheetFailedMessage(context, data.reason);
    recipients = await usersWithRoles(["qa", "prepress"]);
  }
  if (recipients.length === 0) return { sent: 0 };
  // One message to all recipients (staff of one plant): one SMTP transaction, so a retry after an outage
  // never sends some people the message twice.
  await mailTransport().sendMail({
    from: env.MAIL_FROM,
    to: recipients.map((r) => ({ name: r.name, address: r.email })),
    subject: message.subject,
    text: message.text,
  });
  return { sent: recipients.length };
}
