"use client";
// The run chart: per inspected sheet, by sheet number, the overall colour drift (ΔE00, left axis, the profile's
// ΔE00 limit drawn) and the number of findings (bars, right axis). Sheets with repeating or every-up findings
// carry a mark; the verdict colours each point. Clicking a point or bar opens that sheet.
import { useRouter } from "next/navigation";
import { Bar, CartesianGrid, ComposedChart, Line, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis, type TooltipContentProps } from "recharts";
import type { NameType, ValueType } from "recharts/types/component/DefaultTooltipContent";

export interface ChartSheet {
  sheetNumber: number;
  inspectionId: number;
  drift: number | null;
  findings: number;
  verdict: "pending" | "passed" | "failed";
  repeating: number;
  everyUp: number;
}

const verdictColour = { pending: "#8a5a00", passed: "#2f6b2f", failed: "#a3272f" } as const;
const verdictWord = { pending: "not signed", passed: "passed", failed: "failed" } as const;

function Tip({ active, payload }: TooltipContentProps<ValueType, NameType>) {
  const s = active ? (payload?.[0]?.payload as ChartSheet | undefined) : undefined;
  if (!s) return null;
  return (
    <div className="rounded-md border border-rule bg-surface px-3 py-2 text-xs shadow">
      <p className="font-semibold">Sheet {s.sheetNumber} · {verdictWord[s.verdict]}</p>
      <p>Drift ΔE00 {s.drift === null ? "—" : s.drift.toFixed(2)} · {s.findings} finding{s.findings === 1 ? "" : "s"}</p>
      {s.repeating > 0 && <p className="text-caution">{s.repeating} repeating</p>}
      {s.everyUp > 0 && <p className="text-danger">{s.everyUp} in every up</p>}
      <p className="text-ink-muted">Click to open the sheet</p>
    </div>
  );
}

export function RunChart({ jobId, sheets, limit }: { jobId: number; sheets: ChartSheet[]; limit: number | null }) {
  const router = useRouter();
  const open = (s: ChartSheet | undefined) => s && router.push(`/jobs/${jobId}/sheets/${s.inspectionId}`);
  const maxDrift = Math.max(limit ?? 0, ...sheets.map((s) => s.drift ?? 0));
  return (
    <div className="h-72 w-full" data-testid="run-chart">
      <ResponsiveContainer width="100%" height="100%">
        <ComposedChart data={sheets} margin={{ top: 12, right: 8, bottom: 8, left: 0 }}>
          <CartesianGrid stroke="#dcdad3" strokeDasharray="3 3" />
          <XAxis dataKey="sheetNumber" type="category" tick={{ fontSize: 12 }} label={{ value: "Sheet number", position: "insideBottom", offset: -4, fontSize: 12 }} height={40} />
          <YAxis yAxisId="drift" domain={[0, Math.ceil(maxDrift + 0.5)]} tick={{ fontSize: 12 }} width={44} label={{ value: "ΔE00", angle: -90, position: "insideLeft", fontSize: 12 }} />
          <YAxis yAxisId="count" orientation="right" allowDecimals={false} tick={{ fontSize: 12 }} width={36} label={{ value: "Findings", angle: 90, position: "insideRight", fontSize: 12 }} />
          <Tooltip content={Tip} />
          <Bar yAxisId="count" dataKey="findings" name="Findings" fill="#0e5e63" fillOpacity={0.25} cursor="pointer" onClick={(d) => open(d.payload as ChartSheet)} isAnimationActive={false} />
          {limit !== null && (
            <ReferenceLine yAxisId="drift" y={limit} stroke="#a3272f" strokeDasharray="6 3" label={{ value: `limit ΔE00 ${limit}`, position: "insideTopRight", fontSize: 11, fill: "#a3272f" }} />
          )}
          <Line
            yAxisId="drift"
            dataKey="drift"
            name="Drift ΔE00"
            stroke="#1c2430"
            strokeWidth={1.5}
            connectNulls
            isAnimationActive={false}
            dot={(props) => <SheetDot key={props.index} {...props} onOpen={open} />}
            activeDot={false}
          />
        </ComposedChart>
      </ResponsiveContainer>
    </div>
  );
}

interface DotProps {
  cx?: number;
  cy?: number;
  payload?: ChartSheet;
  onOpen: (s: ChartSheet | undefined) => void;
}

/** A point coloured by verdict; a ring marks a sheet with repeating or every-up findings. */
function SheetDot({ cx, cy, payload, onOpen }: DotProps) {
  if (cx === undefined || cy === undefined || !payload || payload.drift === null) return null;
  const marked = payload.repeating + payload.everyUp > 0;
  return (
    <g
      role="link"
      tabIndex={0}
      aria-label={`Sheet ${payload.sheetNumber}: drift ΔE00 ${payload.drift.toFixed(2)}, ${payload.findings} findings, ${verdictWord[payload.verdict]}${marked ? ", with repeating findings" : ""}`}
      onClick={() => onOpen(payload)}
      onKeyDown={(e) => (e.key === "Enter" ? onOpen(payload) : undefined)}
      style={{ cursor: "pointer" }}
      data-sheet={payload.sheetNumber}
    >
      {marked && <circle cx={cx} cy={cy} r={9} fill="none" stroke="#8a5a00" strokeWidth={2} />}
      <circle cx={cx} cy={cy} r={5} fill={verdictColour[payload.verdict]} stroke="#ffffff" strokeWidth={1.5} />
    </g>
  );
}
