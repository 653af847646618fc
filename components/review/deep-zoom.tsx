"use client";
// The deep-zoom viewer of one sheet (OpenSeadragon over the worker's DZI tiles): artwork and aligned scan side by
// side with pan and zoom locked together, or laid over each other with an opacity slider, a split divider, or
// alternating at a set rate; the difference as a layer; finding boxes, the up grid and the scanned area drawn
// on top; a scale bar in millimetres.
import type OpenSeadragon from "openseadragon";
import { useEffect, useRef, useState } from "react";
import type { SheetFinding, SheetView } from "@/lib/review/sheet";
import { scaleBarMm, toViewport, upBoxes, zoomBox, type BoxMm } from "./geometry";

export type CompareMode = "side" | "overlay" | "split" | "alternate";
type Osd = typeof OpenSeadragon;

const MODES: { value: CompareMode; label: string }[] = [
  { value: "side", label: "Side by side" },
  { value: "overlay", label: "Overlay" },
  { value: "split", label: "Split" },
  { value: "alternate", label: "Alternate" },
];

interface Props {
  sheet: SheetView;
  tiles: { artwork: string; scan: string; difference: string };
  selectedId: number | null;
  onSelect: (id: number) => void;
}

const decisionClass = { pending: "tz-box-pending", accepted: "tz-box-accepted", rejected: "tz-box-rejected" } as const;

export function DeepZoom({ sheet, tiles, selectedId, onSelect }: Props) {
  const [mode, setMode] = useState<CompareMode>("side");
  const [opacity, setOpacity] = useState(50);
  const [split, setSplit] = useState(50);
  const [rate, setRate] = useState(2);
  const [showDifference, setShowDifference] = useState(false);
  const [showBoxes, setShowBoxes] = useState(true);
  const [showUps, setShowUps] = useState(true);
  const [scale, setScale] = useState<{ mm: number; px: number } | null>(null);
  const [failed, setFailed] = useState(false);
  const leftRef = useRef<HTMLDivElement>(null);
  const rightRef = useRef<HTMLDivElement>(null);
  const viewers = useRef<OpenSeadragon.Viewer[]>([]);
  const osd = useRef<Osd | null>(null);
  const pageW = sheet.page.widthMm;

  // Build the viewer(s) for the mode; layers: [artwork, scan, difference] in one viewer, or artwork | scan + difference.
  useEffect(() => {
    let cancelled = false;
    const made: OpenSeadragon.Viewer[] = [];
    void import("openseadragon").then(({ default: OSD }) => {
      if (cancelled) return;
      osd.current = OSD;
      const base = { showNavigationControl: false, gestureSettingsMouse: { clickToZoom: false }, visibilityRatio: 0.5, maxZoomPixelRatio: 4, animationTime: 0.4 };
      const single = mode !== "side";
      const left = new OSD.Viewer({ ...base, element: leftRef.current!, tileSources: single ? [tiles.artwork, tiles.scan, tiles.difference] : [tiles.artwork] });
      made.push(left);
      if (!single && rightRef.current) made.push(new OSD.Viewer({ ...base, element: rightRef.current, tileSources: [tiles.scan, tiles.difference] }));
      for (const v of made) v.addHandler("open-failed", () => setFailed(true));
      viewers.current = made;
      lockTogether(made);
      made[0].addHandler("animation", () => updateScale(made[0]));
      made[0].addHandler("open", () => updateScale(made[0]));
    });
    function updateScale(v: OpenSeadragon.Viewer) {
      const OSD = osd.current!;
      const pxPerMm = v.viewport.deltaPixelsFromPoints(new OSD.Point(1 / pageW, 0), true).x;
      const mm = scaleBarMm(pxPerMm);
      setScale({ mm, px: mm * pxPerMm });
    }
    return () => {
      cancelled = true;
      for (const v of made) v.destroy();
      viewers.current = [];
    };
  }, [mode, tiles.artwork, tiles.scan, tiles.difference, pageW]);

  // Layer settings: the scan's opacity, clip (split) or alternation; the difference's visibility.
  useEffect(() => {
    let timer: ReturnType<typeof setInterval> | undefined;
    const apply = () => {
      const [main] = viewers.current;
      if (!main || !osd.current) return false;
      const world = main.world;
      const scanLayer = mode === "side" ? viewers.current[1]?.world.getItemAt(0) : world.getItemAt(1);
      const diffLayer = mode === "side" ? viewers.current[1]?.world.getItemAt(1) : world.getItemAt(2);
      if (!scanLayer || !diffLayer) return false;
      diffLayer.setOpacity(showDifference ? 1 : 0);
      scanLayer.setClip(null);
      if (mode === "overlay") scanLayer.setOpacity(opacity / 100);
      else scanLayer.setOpacity(1);
      if (mode === "split") {
        const size = scanLayer.getContentSize();
        scanLayer.setClip(new osd.current.Rect((size.x * split) / 100, 0, size.x, size.y));
      }
      if (mode === "alternate") {
        let on = true;
        timer = setInterval(() => {
          on = !on;
          scanLayer.setOpacity(on ? 1 : 0);
        }, 1000 / rate);
      }
      return true;
    };
    // The layers arrive asynchronously after the viewer opens: try until they are there.
    const waiting = setInterval(() => apply() && clearInterval(waiting), 150);
    return () => {
      clearInterval(waiting);
      if (timer) clearInterval(timer);
    };
  }, [mode, opacity, split, rate, showDifference]);

  // Boxes, up grid and scanned area as overlays in every viewer.
  useEffect(() => {
    const draw = () => {
      const OSD = osd.current;
      if (!OSD || viewers.current.length === 0) return false;
      for (const v of viewers.current) {
        v.clearOverlays();
        const add = (box: BoxMm, element: HTMLElement) => {
          const r = toViewport(box, pageW);
          v.addOverlay({ element, location: new OSD.Rect(r.x, r.y, r.w, r.h) });
        };
        if (showUps && sheet.ups.rows * sheet.ups.columns > 1) {
          for (const up of upBoxes(sheet.ups)) add(up, labelled("tz-up", `Up ${up.number}`));
        }
        if (sheet.coveredMm && (sheet.coveredMm.w < sheet.page.widthMm - 0.5 || sheet.coveredMm.h < sheet.page.heightMm - 0.5)) {
          add(sheet.coveredMm, labelled("tz-covered", "Scanned area"));
        }
        if (showBoxes) {
          for (const f of sheet.findings) {
            // At least 1.5 mm across so a dot-sized finding can still be seen and clicked.
            const pad = Math.max(0, (1.5 - Math.min(f.wMm, f.hMm)) / 2);
            const el = labelled(`tz-box ${decisionClass[f.decision]}${f.id === selectedId ? " tz-box-selected" : ""}`, String(f.number));
            el.addEventListener("pointerdown", (e) => e.stopPropagation());
            el.addEventListener("click", () => onSelect(f.id));
            add({ x: f.xMm - pad, y: f.yMm - pad, w: f.wMm + 2 * pad, h: f.hMm + 2 * pad }, el);
          }
        }
      }
      return true;
    };
    const waiting = setInterval(() => draw() && clearInterval(waiting), 150);
    return () => clearInterval(waiting);
  }, [sheet, showBoxes, showUps, selectedId, onSelect, pageW, mode]);

  // Picking a finding zooms every viewer to it.
  useEffect(() => {
    const f = sheet.findings.find((x) => x.id === selectedId);
    if (!f) return;
    const go = () => {
      const OSD = osd.current;
      const main = viewers.current[0];
      if (!OSD || !main?.world.getItemCount()) return false;
      const r = toViewport(zoomBox({ x: f.xMm, y: f.yMm, w: f.wMm, h: f.hMm }), pageW);
      main.viewport.fitBounds(new OSD.Rect(r.x, r.y, r.w, r.h));
      return true;
    };
    const waiting = setInterval(() => go() && clearInterval(waiting), 150);
    return () => clearInterval(waiting);
  }, [selectedId, sheet.findings, pageW, mode]);

  const zoomBy = (factor: number) => viewers.current[0]?.viewport.zoomBy(factor);
  const home = () => viewers.current[0]?.viewport.goHome();

  return (
    <section aria-labelledby="viewer-heading" className="space-y-3 rounded-xl border border-rule bg-surface p-3 shadow-sm sm:p-4">
      <div className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <h2 id="viewer-heading" className="text-lg font-semibold">Sheet</h2>
        <fieldset className="flex flex-wrap gap-1" aria-label="How to compare">
          <legend className="sr-only">How to compare</legend>
          {MODES.map((m) => (
            <label key={m.value} className={`cursor-pointer rounded-md border px-2.5 py-1 text-sm ${mode === m.value ? "border-accent bg-accent-soft font-medium text-accent-strong" : "border-rule text-ink"}`}>
              <input type="radio" name="compare-mode" value={m.value} checked={mode === m.value} onChange={() => setMode(m.value)} className="sr-only" />
              {m.label}
            </label>
          ))}
        </fieldset>
        <div className="ml-auto flex gap-1">
          <ToolButton label="Zoom in" onClick={() => zoomBy(1.6)}>+</ToolButton>
          <ToolButton label="Zoom out" onClick={() => zoomBy(1 / 1.6)}>−</ToolButton>
          <ToolButton label="Whole sheet" onClick={home}>⤢</ToolButton>
        </div>
      </div>
      <div className="flex flex-wrap items-center gap-x-5 gap-y-2 text-sm">
        {mode === "overlay" && <Slider id="opacity" label="Scan over artwork" value={opacity} onChange={setOpacity} unit="%" />}
        {mode === "split" && <Slider id="split" label="Divider" value={split} onChange={setSplit} unit="% from left" />}
        {mode === "alternate" && (
          <label className="flex items-center gap-2">
            <span>Alternate</span>
            <select value={rate} onChange={(e) => setRate(Number(e.target.value))} className="rounded-md border border-rule bg-surface px-2 py-1">
              {[1, 2, 4].map((r) => (
                <option key={r} value={r}>{r} times a second</option>
              ))}
            </select>
          </label>
        )}
        <Toggle label="Difference" checked={showDifference} onChange={setShowDifference} />
        <Toggle label="Finding boxes" checked={showBoxes} onChange={setShowBoxes} />
        <Toggle label="Up grid" checked={showUps} onChange={setShowUps} />
      </div>
      {failed && <p role="alert" className="text-sm text-danger">The zoom tiles could not be loaded. Reload the page; if it stays so, the close-ups beside still show every finding.</p>}
      <div className={`grid gap-2 ${mode === "side" ? "grid-cols-2" : "grid-cols-1"}`}>
        <Pane label={mode === "side" ? "Artwork" : mode === "split" ? "Artwork (right) | scan (left)" : "Artwork and scan"} scale={scale}>
          <div ref={leftRef} className="h-full w-full" role="img" aria-label="Zoomable view of the artwork page" />
        </Pane>
        {mode === "side" && (
          <Pane label={showDifference ? "Scan with difference" : "Scan, aligned to the artwork"} scale={null}>
            <div ref={rightRef} className="h-full w-full" role="img" aria-label="Zoomable view of the scanned sheet, aligned to the artwork" />
          </Pane>
        )}
      </div>
      <p className="text-xs text-ink-muted">
        Drag to pan, scroll or pinch to zoom; both views move together. Magenta in the difference: darker on the scan; blue: lighter. Grey: not on the scan.
      </p>
    </section>
  );
}

function lockTogether(viewers: OpenSeadragon.Viewer[]) {
  if (viewers.length < 2) return;
  let leader: OpenSeadragon.Viewer | null = null;
  for (const v of viewers) {
    const follow = () => {
      if (leader && leader !== v) return;
      leader = v;
      for (const other of viewers) {
        if (other === v) continue;
        other.viewport.zoomTo(v.viewport.getZoom(), undefined, true);
        other.viewport.panTo(v.viewport.getCenter(), true);
      }
      leader = null;
    };
    v.addHandler("viewport-change", follow);
  }
}

function labelled(className: string, text: string): HTMLElement {
  const el = document.createElement("div");
  el.className = className;
  const tag = document.createElement("span");
  tag.textContent = text;
  el.appendChild(tag);
  return el;
}

function Pane({ label, scale, children }: { label: string; scale: { mm: number; px: number } | null; children: React.ReactNode }) {
  return (
    <figure className="relative h-[26rem] overflow-hidden rounded-md border border-rule bg-[#e9e7e1] lg:h-[34rem]">
      {children}
      <figcaption className="pointer-events-none absolute left-2 top-2 rounded bg-surface/90 px-2 py-0.5 text-xs font-medium text-ink">{label}</figcaption>
      {scale && (
        <div className="pointer-events-none absolute bottom-2 left-2 rounded bg-surface/90 px-2 py-1 text-xs text-ink" aria-live="off">
          <div className="h-1.5 border-x-2 border-b-2 border-ink" style={{ width: `${Math.round(scale.px)}px` }} />
          <div className="mt-0.5 tabular-nums">{scale.mm} mm</div>
        </div>
      )}
    </figure>
  );
}

function ToolButton({ label, onClick, children }: { label: string; onClick: () => void; children: React.ReactNode }) {
  return (
    <button type="button" onClick={onClick} aria-label={label} title={label} className="h-8 w-8 rounded-md border border-rule bg-surface text-base font-medium text-ink hover:bg-paper">
      {children}
    </button>
  );
}

function Toggle({ label, checked, onChange }: { label: string; checked: boolean; onChange: (v: boolean) => void }) {
  return (
    <label className="flex items-center gap-1.5">
      <input type="checkbox" checked={checked} onChange={(e) => onChange(e.target.checked)} className="h-4 w-4 accent-accent" />
      {label}
    </label>
  );
}

function Slider({ id, label, value, onChange, unit }: { id: string; label: string; value: number; onChange: (v: number) => void; unit: string }) {
  return (
    <label htmlFor={id} className="flex items-center gap-2">
      <span>{label}</span>
      <input id={id} type="range" min={0} max={100} value={value} onChange={(e) => onChange(Number(e.target.value))} className="w-36 accent-accent" />
      <span className="w-24 tabular-nums text-ink-muted">{value} {unit}</span>
    </label>
  );
}

export type { SheetFinding };
