// A report as an HTTP answer: shown in the browser's PDF viewer, saved under a file name made of the job number.
export function pdfResponse({ bytes, fileName }: { bytes: Uint8Array; fileName: string }): Response {
  return new Response(new Uint8Array(bytes), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `inline; filename="${fileName}"`,
      "Cache-Control": "no-store",
    },
  });
}
