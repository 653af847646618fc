// Sends a form with XMLHttpRequest, because fetch cannot report upload progress yet.
export interface SendResult {
  status: number;
  body: unknown;
}

export function sendForm(url: string, form: FormData, onProgress: (fraction: number) => void): Promise<SendResult> {
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", url);
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => resolve({ status: xhr.status, body: xhr.response });
    xhr.onerror = () =>
      resolve({ status: 0, body: { error: { code: "network", message: "The connection broke during the upload; nothing was saved. Please try again." } } });
    xhr.send(form);
  });
}

export const errorMessageOf = (body: unknown): string =>
  (body as { error?: { message?: string } } | null)?.error?.message ?? "The server did not answer as expected. Please try again.";

export async function postJson(url: string): Promise<SendResult> {
  const res = await fetch(url, { method: "POST" });
  return { status: res.status, body: await res.json().catch(() => null) };
}
