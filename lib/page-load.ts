// For pages: the record named by an id in the URL, or the page's 404. An id that is not a positive integer, or
// that the data layer answers "not found" (another customer's job is one), ends in notFound(); with
// `hideForbidden` a 403 does too, for pages whose very existence a reader without the right must not learn.
import { notFound } from "next/navigation";
import { AppError } from "./errors";

export async function loadForPage<T>(rawId: string, load: (id: number) => Promise<T>, options: { hideForbidden?: boolean } = {}): Promise<T> {
  const id = /^\d{1,15}$/.test(rawId) ? Number(rawId) : NaN;
  if (!Number.isSafeInteger(id) || id <= 0) notFound();
  try {
    return await load(id);
  } catch (error) {
    if (error instanceof AppError && (error.status === 404 || (options.hideForbidden && error.status === 403))) notFound();
    throw error;
  }
}
