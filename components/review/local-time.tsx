"use client";
// A time in the reader's own time zone. The server does not know that zone, so the server's render (and
// hydration) shows UTC and the browser's snapshot shows local time.
import { useSyncExternalStore } from "react";

export function formatLocal(iso: string): string {
  return new Intl.DateTimeFormat(undefined, { year: "numeric", month: "short", day: "numeric", hour: "2-digit", minute: "2-digit", timeZoneName: "short" }).format(new Date(iso));
}

const noSubscription = () => () => undefined;

export function LocalTime({ iso }: { iso: string }) {
  const text = useSyncExternalStore(noSubscription, () => formatLocal(iso), () => `${iso.slice(0, 16).replace("T", " ")} UTC`);
  return <time dateTime={iso}>{text}</time>;
}
