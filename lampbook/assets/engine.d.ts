// The engine worker's messages (worker.js <-> widget.js). The requests and answers they carry are
// the page protocol, generated from the core: protocol.d.ts.
import type { Answer, Request } from "./protocol";

/** Page to worker: one request for lampcalc.api.handle. */
export interface Query {
  type: "query";
  id: number;
  request: Request;
}

/** Worker to page. */
export type Reply =
  | { type: "ready" }
  | { type: "failed"; error: string }
  | { type: "stored" } // the engine's downloads are handed to the offline cache
  | { type: "result"; id: number; answer: Answer };

/** The start-up phases in ms from the worker's start (read by the benchmarks). */
export interface Phases {
  origin: number;
  script: number;
  runtime?: number;
  package?: number;
  imported?: number;
  stored?: number;
  /** the snapshot of the started engine was made (a first visit; only where the build allows snapshots) */
  snapshot?: number;
  /** the engine was restored from the snapshot kept on the device */
  restored?: boolean;
}

/** The engine the page's head started early (the plugin writes that script), and what it heard before widget.js took over. */
export interface EarlyEngine {
  worker: Worker;
  queue: (MessageEvent<Reply> | ErrorEvent)[];
  taken?: boolean;
}

/** The theme's page observable: it emits on every page of instant navigation. */
export interface PageObservable {
  subscribe(next: () => void): unknown;
}

declare global {
  interface Window {
    lbEngine?: EarlyEngine;
    document$?: PageObservable;
  }
  // widget.js reads it as a global of the page (the theme sets it)
  var document$: PageObservable | undefined;
  interface WorkerGlobalScope {
    lbPhases?: Phases;
  }
}
