"use client";
// The findings of one inspected sheet, with the artwork, scan and difference crops side by side.
import { useQuery } from "@tanstack/react-query";
import { KIND_LABELS as kindLabel } from "@/components/review/labels";
import type { FindingView } from "@/lib/pipeline/inspections";

export function FindingsList({ inspectionId }: { inspectionId: number }) {
  const { data, error, isPending } = useQuery({
    queryKey: ["findings", inspectionId],
    queryFn: async () => {
      const res = await fetch(`/api/inspections/${inspectionId}/findings`);
      if (!res.ok) throw new Error("The findings could not be loaded.");
      return ((await res.json()) as { findings: FindingView[] }).findings;
    },
  });
  if (isPending) return <p className="text-sm text-ink-muted">Loading findings…</p>;
  if (error) return <p className="text-sm text-danger">{error.message}</p>;
  if (data.length === 0) return <p className="text-sm text-ok">No differences from the approved artwork were found.</p>;
  return (
    <ol className="grid gap-3 sm:grid-cols-2 xl:grid-cols-3">
      {data.map((f, i) => (
        <li key={f.id} className="rounded-lg border border-rule bg-paper/40 p-3 text-sm">
          <div className="mb-2 flex flex-wrap justify-between gap-2">
            <span className="font-medium">
              {i + 1}. {kindLabel[f.kind]}
              {f.up ? ` · up ${f.up}` : ""}
            </span>
            <span className="tabular-nums text-ink-muted">
              ΔE00 max {f.deltaE00Max.toFixed(1)} · {f.wMm.toFixed(1)} × {f.hMm.toFixed(1)} mm at ({f.xMm.toFixed(1)}, {f.yMm.toFixed(1)})
            </span>
          </div>
          {f.crops && (
            <div className="grid grid-cols-3 gap-1">
              {(["artwork", "scan", "difference"] as const).map((k) => (
                <figure key={k}>
                  {/* eslint-disable-next-line @next/next/no-img-element -- crops are streamed through a policy-checked route */}
                  <img src={f.crops![k]} alt={`${k} around finding ${i + 1}`} className="aspect-square w-full rounded border border-rule bg-white object-contain" loading="lazy" />
                  <figcaption className="mt-0.5 text-center text-xs capitalize text-ink-muted">{k}</figcaption>
                </figure>
              ))}
            </div>
          )}
        </li>
      ))}
    </ol>
  );
}
