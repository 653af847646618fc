// Loads OpenCV's official WebAssembly build (@techstark/opencv-js 4.12.0-release.1) once per process.
//
// Why this shape: the build is an old-style Emscripten module. It is a CommonJS object that becomes usable only
// after `onRuntimeInitialized`, and it carries a `then` method that hands back the module itself — so awaiting
// it (or returning it from an async function) resolves a thenable with a thenable and never settles. We wait
// on `onRuntimeInitialized`, then drop `then` so the ready module can travel through promises. At load the
// build also installs process-wide `uncaughtException` / `unhandledRejection` handlers that abort the whole
// program; those are removed again so a failing job in the worker (or a failing test) stays an ordinary error.
// Works the same under tsx (Node ESM) and Vitest, which both honour `createRequire`.
import { createRequire } from "node:module";

/** The OpenCV namespace; the package's own typings lag the build, so it is used untyped in a few modules. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type OpenCv = any;

let loading: Promise<OpenCv> | null = null;

export function loadOpenCv(): Promise<OpenCv> {
  loading ??= new Promise<OpenCv>((resolve, reject) => {
    const before = {
      uncaught: process.listeners("uncaughtException"),
      rejection: process.listeners("unhandledRejection"),
    };
    const restore = () => {
      for (const l of process.listeners("uncaughtException")) if (!before.uncaught.includes(l)) process.off("uncaughtException", l);
      for (const l of process.listeners("unhandledRejection")) if (!before.rejection.includes(l)) process.off("unhandledRejection", l);
    };
    try {
      const cv = createRequire(import.meta.url)("@techstark/opencv-js");
      restore();
      const ready = () => {
        delete cv.then;
        resolve(cv);
      };
      if (cv.calledRun && typeof cv.Mat === "function") ready();
      else cv.onRuntimeInitialized = ready;
    } catch (e) {
      restore();
      loading = null;
      reject(e instanceof Error ? e : new Error(String(e)));
    }
  });
  return loading;
}

/** OpenCV throws C++ exceptions as bare pointers; turn one into a readable message. */
export function openCvMessage(cv: OpenCv, e: unknown): string {
  if (typeof e === "number") {
    try {
      return String(cv.exceptionFromPtr(e).msg);
    } catch {
      return `OpenCV exception ${e}`;
    }
  }
  return e instanceof Error ? e.message : String(e);
}

/** Runs `fn` with a list that collects Mats; every collected Mat is freed afterwards, thrown or not. */
export function withMats<T>(fn: (keep: <M extends { delete(): void }>(m: M) => M) => T): T {
  const mats: { delete(): void }[] = [];
  try {
    return fn((m) => {
      mats.push(m);
      return m;
    });
  } finally {
    for (const m of mats) m.delete();
  }
}
