// Worker-thread entry: worker threads do not inherit tsx's loader, so register it here and load the TypeScript.
import { workerData } from "node:worker_threads";
import { register } from "tsx/esm/api";

register();
await import(workerData.entry);
