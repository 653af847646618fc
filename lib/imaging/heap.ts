// The V8 heap of a process that inspects sheets in worker threads. Each thread keeps a large live heap (pdf.js,
// compiled code, tsx's source maps: ~150 MB) and each B2 sheet at 100 dpi passes ~30 MB of short-lived objects
// and ~20 MB of buffers from libvips through it. With V8's default growth the old generation's limit sits only
// ~30 MB above the live heap, so the whole heap was marked about once a sheet (20–25 ms of a ~350 ms sheet,
// plus the concurrent marker's CPU). Letting it grow to twice the live size first removed those collections
// (none in 12 sheets) and gave ~12 % more sheets a second on 2 cores, for up to ~150 MB more per thread
// (alternating throughput runs with and without it; npm run bench measures with it only).
import v8 from "node:v8";

export const HEAP_GROWING_PERCENT = 100;

/** Sets the growth for every isolate of the process (a process-wide V8 flag); call before starting threads. */
export function growHeapBeforeMarking(): void {
  v8.setFlagsFromString(`--heap-growing-percent=${HEAP_GROWING_PERCENT}`);
}
