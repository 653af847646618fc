"use client";
// Excluded areas of one artwork revision on a picture of its page: dragged with the pointer on the picture (mouse,
// pen or finger) or typed in millimetres, then editable and removable in the list. "In every up" areas are
// measured from the up's top-left and drawn in every up. Editable while the revision is a draft; locked once
// approved.
import { useEffect, useRef, useState, type PointerEvent } from "react";
import { inputClass, quietButtonClass, buttonClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { ExcludedArea } from "@/db/schema";
import { drawnArea, pointerToMm, spanned } from "@/lib/pipeline/draw-area";
import { expandExcludedAreas, upRect } from "@/lib/pipeline/excluded-areas";
import type { RevisionView } from "@/lib/pipeline/view";
import { errorMessageOf } from "./send-form";

type Point = { x: number; y: number };

function PagePicture({ revision, onLoaded }: { revision: RevisionView; onLoaded: () => void }) {
  const [attempt, setAttempt] = useState(0);
  const [failed, setFailed] = useState(false);
  const image = useRef<HTMLImageElement>(null);
  useEffect(() => {
    // A picture already in the browser's cache can finish before React listens for its load event.
    if (image.current?.complete && image.current.naturalWidth > 0) onLoaded();
  }, [onLoaded]);
  useEffect(() => {
    if (!failed) return;
    // The worker is still making the picture: ask again shortly.
    const timer = setTimeout(() => {
      setFailed(false);
      setAttempt((a) => a + 1);
    }, 3000);
    return () => clearTimeout(timer);
  }, [failed]);
  return (
    <>
      {/* eslint-disable-next-line @next/next/no-img-element -- a policy-checked route, not a static asset */}
      <img
        ref={image}
        src={`/api/artworks/${revision.id}/preview${attempt ? `?try=${attempt}` : ""}`}
        alt={`Page 1 of artwork revision ${revision.revision}`}
        className="absolute inset-0 h-full w-full select-none"
        draggable={false}
        onLoad={onLoaded}
        onError={() => setFailed(true)}
      />
    </>
  );
}

export function ExcludedAreasEditor({ revision, editable, refresh }: { revision: RevisionView; editable: boolean; refresh: () => void }) {
  const [areas, setAreas] = useState<ExcludedArea[]>(revision.excludedAreas);
  const [saving, setSaving] = useState(false);
  const [loaded, setLoaded] = useState(false);
  const [notice, setNotice] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [drawScope, setDrawScope] = useState<ExcludedArea["scope"]>(revision.upsRows * revision.upsColumns > 1 ? "up" : "sheet");
  const [drag, setDrag] = useState<{ start: Point; end: Point } | null>(null);
  const surface = useRef<SVGSVGElement>(null);
  const saved = JSON.stringify(revision.excludedAreas);
  const [base, setBase] = useState(saved);
  if (base !== saved) {
    // A refresh brought other saved areas (a save, another person): they replace a list nobody is editing.
    setBase(saved);
    if (JSON.stringify(areas) === base) setAreas(revision.excludedAreas);
  }
  const dirty = JSON.stringify(areas) !== saved;

  const W = revision.pageWidthMm;
  const H = revision.pageHeightMm;
  if (!W || !H) {
    return (
      <p role="status" className="text-sm text-ink-muted">
        The page picture is being made; excluded areas can be drawn in a moment.
      </p>
    );
  }
  const page = { widthMm: W, heightMm: H };
  const ups = { rows: revision.upsRows, columns: revision.upsColumns, areaMm: revision.upsAreaMm ?? undefined };
  const cells = Array.from({ length: ups.rows * ups.columns }, (_, i) => upRect(ups, page, Math.floor(i / ups.columns), i % ups.columns));

  const change = (i: number, patch: Partial<ExcludedArea>) => setAreas((list) => list.map((a, j) => (j === i ? { ...a, ...patch } : a)));

  async function save() {
    setSaving(true);
    setNotice(null);
    const res = await fetch(`/api/artworks/${revision.id}/excluded-areas`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ areas }) });
    const body = await res.json().catch(() => null);
    setSaving(false);
    if (res.ok) {
      setNotice({ tone: "ok", text: areas.length ? `Saved ${areas.length} excluded area${areas.length === 1 ? "" : "s"}.` : "Saved: no excluded areas." });
      refresh();
    } else setNotice({ tone: "error", text: errorMessageOf(body) });
  }

  const at = (e: PointerEvent<SVGSVGElement>) => pointerToMm(e.clientX, e.clientY, surface.current!.getBoundingClientRect(), page);
  const drawing = editable
    ? {
        onPointerDown: (e: PointerEvent<SVGSVGElement>) => {
          if (e.button !== 0) return;
          e.currentTarget.setPointerCapture(e.pointerId);
          const p = at(e);
          setDrag({ start: p, end: p });
        },
        onPointerMove: (e: PointerEvent<SVGSVGElement>) => drag && setDrag({ ...drag, end: at(e) }),
        onPointerUp: (e: PointerEvent<SVGSVGElement>) => {
          if (!drag) return;
          const area = drawnArea(drag.start, at(e), drawScope, ups, page);
          setDrag(null);
          if (area) setAreas((list) => [...list, area]);
        },
        onPointerCancel: () => setDrag(null),
      }
    : {};
  const dragged = drag ? spanned(drag.start, drag.end) : null;

  const shown = expandExcludedAreas(areas, ups, page);
  const stroke = Math.max(W, H) / 400;
  return (
    <div className="space-y-3">
      <div className="grid gap-4 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="space-y-2">
          <div className="relative w-full overflow-hidden rounded-md border border-rule bg-paper" style={{ aspectRatio: `${W} / ${H}` }}>
            <PagePicture revision={revision} onLoaded={() => setLoaded(true)} />
            {!loaded && <p className="absolute inset-x-0 top-1/2 text-center text-xs text-ink-muted">Loading the page picture…</p>}
            <svg
              ref={surface}
              {...drawing}
              viewBox={`0 0 ${W} ${H}`}
              preserveAspectRatio="none"
              className={`absolute inset-0 h-full w-full ${editable ? "cursor-crosshair touch-none" : ""}`}
              role="img"
              aria-label={`Page ${W} × ${H} mm with ${ups.rows * ups.columns} ups and ${areas.length} excluded areas`}
            >
              {cells.length > 1 &&
                cells.map((c, i) => (
                  <g key={i}>
                    <rect x={c.x} y={c.y} width={c.w} height={c.h} fill="none" stroke="#0e5e63" strokeOpacity={0.5} strokeWidth={stroke} strokeDasharray={`${stroke * 4} ${stroke * 3}`} />
                    <text x={c.x + stroke * 3} y={c.y + stroke * 12} fontSize={stroke * 10} fill="#0e5e63">
                      {i + 1}
                    </text>
                  </g>
                ))}
              {shown.map((r, i) => (
                <rect key={i} x={r.x} y={r.y} width={r.w} height={r.h} fill="#8a5a00" fillOpacity={0.25} stroke="#8a5a00" strokeWidth={stroke} />
              ))}
              {dragged && <rect x={dragged.x} y={dragged.y} width={dragged.w} height={dragged.h} fill="#8a5a00" fillOpacity={0.15} stroke="#8a5a00" strokeWidth={stroke} strokeDasharray={`${stroke * 3} ${stroke * 2}`} />}
            </svg>
          </div>
          {editable && (
            <div className="flex flex-wrap items-center gap-x-3 gap-y-1 text-xs">
              <span className="text-ink-muted">Drag on the page to draw an area.</span>
              <label className="flex items-center gap-1">
                <span className="font-medium">New areas cover</span>
                <select className="rounded-md border border-rule bg-surface px-2 py-0.5" value={drawScope} onChange={(e) => setDrawScope(e.target.value as ExcludedArea["scope"])}>
                  <option value="up">every up (drawn in one)</option>
                  <option value="sheet">the sheet only</option>
                </select>
              </label>
            </div>
          )}
          <p className="text-xs text-ink-muted">
            {W} × {H} mm, {ups.rows * ups.columns} up{ups.rows * ups.columns === 1 ? "" : "s"}. Nothing is reported inside an excluded area: keep them to the variable data.
          </p>
        </div>
        <div className="space-y-3">
          <h4 className="text-sm font-semibold">Excluded areas {editable || revision.status === "draft" ? "" : "(locked with the approval)"}</h4>
          {areas.length === 0 ? (
            <p className="text-sm text-ink-muted">{editable
                ? "None yet. Drag on the page, or add one and type its position."
                : revision.status === "draft"
                  ? "None yet: prepress draws them before approving."
                  : "None: the whole page is compared."}</p>
          ) : (
            <ol className="space-y-3">
              {areas.map((a, i) => (
                <li key={i} className="rounded-md border border-rule p-3">
                  <fieldset disabled={!editable} className="grid grid-cols-2 gap-2 text-xs sm:grid-cols-4">
                    <legend className="sr-only">Excluded area {i + 1}</legend>
                    <label className="col-span-2 space-y-1">
                      <span className="font-medium">Area {i + 1}: label</span>
                      <input className={inputClass} value={a.label} maxLength={60} placeholder="e.g. lot and expiry" onChange={(e) => change(i, { label: e.target.value })} />
                    </label>
                    <label className="col-span-2 space-y-1">
                      <span className="font-medium">Covers</span>
                      <select className={inputClass} value={a.scope} onChange={(e) => change(i, { scope: e.target.value as ExcludedArea["scope"] })}>
                        <option value="up">every up (from the up&apos;s top-left)</option>
                        <option value="sheet">the sheet (from the page&apos;s top-left)</option>
                      </select>
                    </label>
                    {(["x", "y", "w", "h"] as const).map((k) => (
                      <label key={k} className="space-y-1">
                        <span className="font-medium">{{ x: "Left", y: "Top", w: "Width", h: "Height" }[k]} (mm)</span>
                        <input
                          className={inputClass}
                          type="number"
                          step={0.1}
                          min={0}
                          value={a[k]}
                          onChange={(e) => change(i, { [k]: e.target.value === "" ? 0 : Number(e.target.value) })}
                        />
                      </label>
                    ))}
                  </fieldset>
                  {editable && (
                    <button type="button" className="mt-2 text-xs font-medium text-danger hover:underline" onClick={() => setAreas((list) => list.filter((_, j) => j !== i))}>
                      Remove area {i + 1}
                    </button>
                  )}
                </li>
              ))}
            </ol>
          )}
          {notice && <Notice tone={notice.tone}>{notice.text}</Notice>}
          {editable && (
            <div className="flex flex-wrap items-center gap-2">
              <button type="button" className={quietButtonClass} onClick={() => setAreas((list) => [...list, { scope: "up", label: "", x: 0, y: 0, w: 20, h: 8 }])}>
                Add area
              </button>
              <button type="button" className={buttonClass} disabled={!dirty || saving} onClick={() => void save()}>
                {saving ? "Saving…" : "Save areas"}
              </button>
              {dirty && <span className="text-xs text-caution">Not saved yet</span>}
            </div>
          )}
        </div>
      </div>
    </div>
  );
}
