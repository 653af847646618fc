"use client";
// The sheet page's client side: the viewer, the findings list with the selected finding's decision, and the
// sign-off. Keyboard: N next, P previous, A accept, R reject (not while typing in a field).
import { QueryClient, QueryClientProvider, useQuery, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useCallback, useEffect, useMemo, useState } from "react";
import type { SheetView } from "@/lib/review/sheet";
import { DeepZoom } from "./deep-zoom";
import { FindingDetail, isTyping } from "./finding-detail";
import { DECISION_LABELS, KIND_LABELS } from "./labels";
import { RecurrenceBadge } from "./run-memory";
import { SignoffPanel } from "./signoff-panel";

async function fetchSheet(id: number): Promise<SheetView> {
  const res = await fetch(`/api/inspections/${id}/sheet`, { cache: "no-store" });
  if (!res.ok) throw new Error(((await res.json().catch(() => null)) as { error?: { message?: string } } | null)?.error?.message ?? "The sheet could not be loaded.");
  return res.json();
}

function Workspace({ initial }: { initial: SheetView }) {
  const client = useQueryClient();
  const key = useMemo(() => ["sheet", initial.inspectionId], [initial.inspectionId]);
  const { data: sheet, error, isFetching } = useQuery({
    queryKey: key,
    queryFn: () => fetchSheet(initial.inspectionId),
    initialData: initial,
    // While the worker is still cutting tiles, look again every few seconds.
    refetchInterval: (q) => (q.state.data?.tiles?.status === "pending" || q.state.data?.status !== "done" ? 3000 : false),
  });
  const refresh = useCallback(() => void client.invalidateQueries({ queryKey: key }), [client, key]);
  const router = useRouter();
  // A signature or a reopening changes the page's header (the verdict) too, which the server renders.
  const afterSignoff = useCallback(() => {
    refresh();
    router.refresh();
  }, [refresh, router]);
  const firstPending = sheet.findings.find((f) => f.decision === "pending") ?? sheet.findings[0];
  const [selectedId, setSelectedId] = useState<number | null>(firstPending?.id ?? null);
  const index = sheet.findings.findIndex((f) => f.id === selectedId);
  const selected = index >= 0 ? sheet.findings[index] : null;

  const move = useCallback(
    (step: number) => {
      if (sheet.findings.length === 0) return;
      const next = (Math.max(0, index) + step + sheet.findings.length) % sheet.findings.length;
      setSelectedId(sheet.findings[next].id);
    },
    [index, sheet.findings],
  );

  const afterDecision = useCallback(
    async (advance: boolean) => {
      // staleTime 0: the list must show this decision even right after the previous one.
      const fresh = await client.fetchQuery({ queryKey: key, queryFn: () => fetchSheet(initial.inspectionId), staleTime: 0 });
      if (!advance) return;
      const after = fresh.findings.findIndex((f) => f.id === selectedId);
      const next = [...fresh.findings.slice(after + 1), ...fresh.findings.slice(0, after)].find((f) => f.decision === "pending");
      if (next) setSelectedId(next.id);
    },
    [client, key, initial.inspectionId, selectedId],
  );

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (e.ctrlKey || e.metaKey || e.altKey || isTyping(e.target)) return;
      const k = e.key.toLowerCase();
      if (k === "n") move(1);
      else if (k === "p") move(-1);
      else return;
      e.preventDefault();
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [move]);

  const decided = sheet.findings.filter((f) => f.decision !== "pending").length;
  return (
    <div className="space-y-4">
      {error && <p role="alert" className="text-sm text-danger">{error.message} {isFetching ? "Trying again…" : ""}</p>}
      <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="min-w-0 space-y-4">
          {sheet.status !== "done" ? (
            <Placeholder text={sheet.status === "failed" ? "The inspection of this sheet failed; see the job page for the reason." : "The sheet is still being inspected…"} />
          ) : !sheet.tiles || sheet.tiles.status === "pending" ? (
            <Placeholder text="Preparing the zoom view of this sheet…" busy />
          ) : sheet.tiles.status === "failed" ? (
            <Placeholder text="The zoom view of this sheet could not be prepared. The close-ups beside show every finding; QA can run the inspection again." />
          ) : (
            <DeepZoom sheet={sheet} tiles={sheet.tiles} selectedId={selectedId} onSelect={setSelectedId} />
          )}
        </div>
        <div className="space-y-4">
          <section aria-labelledby="findings-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-4 shadow-sm">
            <div className="flex items-baseline justify-between gap-2">
              <h2 id="findings-heading" className="text-lg font-semibold">Findings</h2>
              <span className="text-sm tabular-nums text-ink-muted">{decided} of {sheet.findings.length} decided</span>
            </div>
            {sheet.findings.length === 0 ? (
              <p className="text-sm text-ok">No differences from the approved artwork were found on this sheet.</p>
            ) : (
              <>
                <ol className="max-h-56 space-y-1 overflow-y-auto pr-1" aria-label="Findings, largest first">
                  {sheet.findings.map((f) => (
                    <li key={f.id}>
                      <button
                        type="button"
                        onClick={() => setSelectedId(f.id)}
                        aria-current={f.id === selectedId ? "true" : undefined}
                        className={`flex w-full items-center gap-2 rounded-md border px-2 py-1.5 text-left text-sm ${f.id === selectedId ? "border-accent bg-accent-soft" : "border-transparent hover:bg-paper"}`}
                      >
                        <span className="w-6 text-right font-semibold tabular-nums">{f.number}</span>
                        <span className="flex-1 truncate">{KIND_LABELS[f.kind]}{f.up ? ` · up ${f.up}` : ""}</span>
                        <RecurrenceBadge recurrence={f.recurrence} />
                        {f.prior && f.decision === "pending" && <span className="text-xs text-accent">on sheet {f.prior.sheetNumber ?? "?"}</span>}
                        <span className={`text-xs font-medium ${f.decision === "accepted" ? "text-ok" : f.decision === "rejected" ? "text-danger" : "text-caution"}`}>{DECISION_LABELS[f.decision]}</span>
                      </button>
                    </li>
                  ))}
                </ol>
                <p className="text-xs text-ink-muted">
                  Keys: <kbd className="rounded border border-rule px-1">N</kbd> next · <kbd className="rounded border border-rule px-1">P</kbd> previous
                  {sheet.may.decide && (
                    <>
                      {" "}· <kbd className="rounded border border-rule px-1">A</kbd> accept · <kbd className="rounded border border-rule px-1">R</kbd> reject
                      {sheet.findings.some((f) => f.prior && f.decision === "pending") && (
                        <>
                          {" "}· <kbd className="rounded border border-rule px-1">C</kbd> confirm as on an earlier sheet
                        </>
                      )}
                    </>
                  )}
                </p>
                {selected && (
                  <div className="border-t border-rule pt-3">
                    <FindingDetail key={selected.id} inspectionId={sheet.inspectionId} jobId={sheet.job.id} finding={selected} mayDecide={sheet.may.decide} onDecided={(advance) => void afterDecision(advance)} />
                  </div>
                )}
              </>
            )}
          </section>
          <SignoffPanel sheet={sheet} onChanged={afterSignoff} />
        </div>
      </div>
    </div>
  );
}

function Placeholder({ text, busy = false }: { text: string; busy?: boolean }) {
  return (
    <div role="status" className="flex h-64 items-center justify-center rounded-xl border border-dashed border-rule bg-surface p-6 text-center text-sm text-ink-muted">
      {busy && <span className="mr-2 inline-block h-3 w-3 animate-pulse rounded-full bg-accent" aria-hidden />}
      {text}
    </div>
  );
}

export function SheetWorkspace({ initial }: { initial: SheetView }) {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { staleTime: 1000, retry: 2, refetchOnWindowFocus: false } } }));
  return (
    <QueryClientProvider client={client}>
      <Workspace initial={initial} />
    </QueryClientProvider>
  );
}
