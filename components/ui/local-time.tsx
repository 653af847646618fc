"use client";
// A moment shown in the reader's own time zone (the browser's), with the full UTC time on hover and in the
// machine-readable attribute. The server renders nothing time-zone dependent, so there is no hydration mismatch.
import { useSyncExternalStore } from "react";

const subscribe = () => () => undefined;
const zone = () => Intl.DateTimeFormat().resolvedOptions().timeZone;

export function LocalTime({ at, withZone = false, dateOnly = false }: { at: string | Date; withZone?: boolean; dateOnly?: boolean }) {
  const timeZone = useSyncExternalStore(subscribe, zone, () => "UTC");
  const date = typeof at === "string" ? new Date(at) : at;
  const text = new Intl.DateTimeFormat("en-GB", {
    timeZone,
    day: "numeric",
    month: "short",
    year: "numeric",
    ...(dateOnly ? {} : { hour: "2-digit", minute: "2-digit" }),
    ...(withZone && !dateOnly ? { timeZoneName: "short" } : {}),
  }).format(date);
  return (
    <time dateTime={date.toISOString()} title={`${date.toISOString().replace("T", " ").slice(0, 19)} UTC`}>
      {text}
    </time>
  );
}
