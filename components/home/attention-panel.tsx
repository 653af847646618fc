"use client";
// "What needs you now": the home page's first panel, by role. Refreshed every thirty seconds.
import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { fetchJson } from "@/components/tables/use-list-params";
import { quietButtonClass } from "@/components/ui/field";
import { LocalTime } from "@/components/ui/local-time";
import type { AttentionKind, AttentionSection } from "@/lib/jobs/attention";

const TITLES: Record<AttentionKind, { title: string; empty: string; tone: string }> = {
  artwork_to_approve: { title: "Artwork waiting for approval", empty: "No draft artwork is waiting.", tone: "border-l-accent" },
  raster_failed: { title: "Artwork that could not be prepared", empty: "Every approved artwork was prepared.", tone: "border-l-danger" },
  inspection_failed: { title: "Inspections that failed", empty: "No inspection has failed.", tone: "border-l-danger" },
  sheet_failed: { title: "Sheets signed as failed (last 30 days)", empty: "No sheet was signed as failed lately.", tone: "border-l-caution" },
  sheet_to_review: { title: "Sheets waiting for review, oldest first", empty: "No sheet is waiting for review.", tone: "border-l-accent" },
  sheet_signed: { title: "Sheets signed lately (last 30 days)", empty: "No sheet of your jobs was signed lately.", tone: "border-l-ok" },
};

export function AttentionPanel() {
  const result = useQuery({
    queryKey: ["attention"],
    queryFn: () => fetchJson<{ sections: AttentionSection[] }>("/api/attention"),
    refetchInterval: 30_000,
  });
  return (
    <section aria-labelledby="attention-heading" className="space-y-3">
      <h2 id="attention-heading" className="text-lg font-semibold">
        What needs you now
      </h2>
      {result.isPending && (
        <p role="status" className="text-sm text-ink-muted">
          Looking for work waiting for you…
        </p>
      )}
      {result.error && (
        <div role="alert" className="flex flex-wrap items-center gap-3 text-sm text-danger">
          {result.error.message}
          <button type="button" className={quietButtonClass} onClick={() => void result.refetch()}>
            Try again
          </button>
        </div>
      )}
      {result.data && (
        <div className="grid gap-4 md:grid-cols-2">
          {result.data.sections.map((section) => {
            const t = TITLES[section.kind];
            return (
              <div key={section.kind} className={`rounded-xl border border-l-4 border-rule bg-surface p-4 shadow-sm ${t.tone}`}>
                <h3 className="flex items-baseline justify-between gap-2 text-sm font-semibold">
                  {t.title}
                  <span className="rounded-full bg-paper px-2 py-0.5 text-xs font-medium tabular-nums text-ink-muted">{section.total}</span>
                </h3>
                {section.items.length === 0 ? (
                  <p className="mt-2 text-sm text-ink-muted">{t.empty}</p>
                ) : (
                  <ul className="mt-2 divide-y divide-rule text-sm">
                    {section.items.map((item) => (
                      <li key={`${item.kind}-${item.id}`} className="py-2">
                        <Link href={`/jobs/${item.jobId}`} className="font-medium text-accent hover:underline">
                          <span className="font-mono text-xs">{item.jobNumber}</span> · {item.subject}
                        </Link>
                        <div className="text-xs text-ink-muted">
                          {item.jobTitle} · {item.customerName} · <LocalTime at={item.at} />
                        </div>
                        {item.detail && <div className="mt-0.5 break-words text-xs text-ink-muted">{item.detail}</div>}
                      </li>
                    ))}
                  </ul>
                )}
                {section.total > section.items.length && (
                  <p className="mt-2 text-xs text-ink-muted">and {section.total - section.items.length} more</p>
                )}
              </div>
            );
          })}
        </div>
      )}
    </section>
  );
}
