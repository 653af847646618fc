// The span to pull: when a sheet is signed failed, the sheets printed between the last passed sheet before it and
// the next passed sheet after it are suspect, so QA pulls that stack from the delivery pile. Pure: sheet numbers
// and verdicts in, spans out. Sheets not signed yet (or not inspected) do not bound a span: only a passed sheet
// shows the press was right again.

export type Verdict = "pending" | "passed" | "failed";

export interface SheetVerdict {
  sheetNumber: number;
  verdict: Verdict;
}

/** Sheets `from`…`to` (inclusive); null means open-ended: from the start, or to the end, of the run. */
export interface SpanToPull {
  from: number | null;
  to: number | null;
  /** The failed sheets that call for this span, in sheet-number order. */
  failedSheets: number[];
}

/**
 * One span per failed sheet, from the sheet after the last passed sheet before it to the sheet before the next
 * passed sheet after it; spans that overlap or touch are merged. Sorted by sheet number.
 */
export function spansToPull(sheets: readonly SheetVerdict[]): SpanToPull[] {
  const sorted = [...sheets].sort((a, b) => a.sheetNumber - b.sheetNumber);
  const spans: SpanToPull[] = [];
  let lastPassed: number | null = null;
  for (let i = 0; i < sorted.length; i++) {
    const sheet = sorted[i];
    if (sheet.verdict === "passed") lastPassed = sheet.sheetNumber;
    if (sheet.verdict !== "failed") continue;
    const nextPassed = sorted.slice(i + 1).find((s) => s.verdict === "passed");
    const span: SpanToPull = {
      from: lastPassed === null ? null : lastPassed + 1,
      to: nextPassed ? nextPassed.sheetNumber - 1 : null,
      failedSheets: [sheet.sheetNumber],
    };
    const previous = spans.at(-1);
    if (previous && touches(previous, span)) {
      previous.to = span.to === null || previous.to === null ? null : Math.max(previous.to, span.to);
      previous.failedSheets.push(sheet.sheetNumber);
    } else {
      spans.push(span);
    }
  }
  return spans;
}

/** `later` starts at or before the sheet after `earlier` ends (spans come in sheet-number order). */
function touches(earlier: SpanToPull, later: SpanToPull): boolean {
  if (earlier.to === null || later.from === null) return true;
  return later.from <= earlier.to + 1;
}

/** How many sheets a span holds; null when it is open-ended. */
export function spanLength(span: SpanToPull): number | null {
  return span.from === null || span.to === null ? null : span.to - span.from + 1;
}

/** "sheets 213 to 240", "sheet 17", "from the start of the run to sheet 12", "sheet 388 to the end of the run". */
export function describeSpan(span: SpanToPull): string {
  if (span.from === null && span.to === null) return "the whole run";
  if (span.from === null) return `from the start of the run to sheet ${span.to}`;
  if (span.to === null) return `sheet ${span.from} to the end of the run`;
  if (span.from === span.to) return `sheet ${span.from}`;
  return `sheets ${span.from} to ${span.to}`;
}

/** "23 of 400 sheets, about one in 17"; without a run length, just the count. */
export function describeSampling(inspected: number, runLength: number | null): string {
  const sheets = `${inspected} sheet${inspected === 1 ? "" : "s"}`;
  if (!runLength) return `${sheets} inspected (run length not set)`;
  if (inspected === 0) return `0 of ${runLength} sheets`;
  return `${inspected} of ${runLength} sheets, about one in ${Math.max(1, Math.round(runLength / inspected))}`;
}
