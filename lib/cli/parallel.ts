/**
 * Picking many spectra on every core: a file of thousands of spectra (a grid) is picked by worker
 * threads (pick-worker.ts) in batches, answers kept in the spectra's order. Picking is a pure
 * function of a spectrum and the settings, so the threads give the same picks as one thread would.
 */
import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import { pickOnView, resolveExtractionSettings, type ExtractionSettings, type GapPick, type Normalised, type ParsedSpectrum } from "../spectra";

/** What an entry needs of the view a gap was picked on (its arrays stay in the thread). */
export type ViewInfo = Pick<Normalised, "method" | "description" | "currentReconstructed">;
export type PickResult = { pick: GapPick; view: ViewInfo } | { error: string };
export interface PickRequest {
  batch: number;
  spectra: ParsedSpectrum[];
  settings: ExtractionSettings;
}

/**
 * Below this many spectra one thread is used: starting a thread and loading the picker in it costs
 * about 50–80 ms (measured on the 2-core development machine), the time of ~150 picks.
 */
export const MIN_SPECTRA_FOR_THREADS = 256;
/** Spectra per message: large enough that messaging is negligible, small enough to share work evenly. */
const BATCH = 64;

export function pickOne(s: ParsedSpectrum, settings: ExtractionSettings): PickResult {
  try {
    const { pick, view } = pickOnView(s, settings);
    return { pick, view: { method: view.method, description: view.description, currentReconstructed: view.currentReconstructed } };
  } catch (e) {
    return { error: (e as Error).message };
  }
}

/** Threads for n spectra: every core (or BANDCROSS_CLI_THREADS), one below MIN_SPECTRA_FOR_THREADS. */
export function threadCount(n: number, env: string | undefined = process.env.BANDCROSS_CLI_THREADS): number {
  const wanted = env === undefined || env === "" ? availableParallelism() : Math.max(1, Math.floor(Number(env)) || 1);
  return n < MIN_SPECTRA_FOR_THREADS ? 1 : Math.max(1, Math.min(wanted, Math.ceil(n / BATCH)));
}

/** Pick every spectrum, in threads when there are many; a thread that cannot start falls back to this one. */
export async function pickAll(spectra: ParsedSpectrum[], settings: ExtractionSettings, warn: (s: string) => void): Promise<PickResult[]> {
  const threads = fromSources ? 1 : threadCount(spectra.length);
  settings = resolveExtractionSettings(settings);
  if (threads > 1) {
    try {
      return await pickInThreads(spectra, settings, threads);
    } catch (e) {
      warn(`bandcross: picking in one thread (${(e as Error).message})\n`);
    }
  }
  return spectra.map((s) => pickOne(s, settings));
}

/**
 * The thread's script: the built command's pick-worker.js beside this chunk (scripts/build-cli.mjs).
 * Run from the TypeScript sources (tsx, or the test runner) there is none: a thread does not load
 * TypeScript through the parent's loader on Node 20, so picking stays in one thread there.
 */
const fromSources = import.meta.url.endsWith(".ts");
const workerUrl = () => new URL("./pick-worker.js", import.meta.url);

function pickInThreads(spectra: ParsedSpectrum[], settings: ExtractionSettings, threads: number): Promise<PickResult[]> {
  const batches = Math.ceil(spectra.length / BATCH);
  const results = new Array<PickResult>(spectra.length);
  const workers: Worker[] = [];
  let next = 0;
  let done = 0;
  return new Promise<PickResult[]>((resolve, reject) => {
    const finish = (err?: Error) => {
      for (const w of workers) void w.terminate();
      if (err) reject(err);
      else resolve(results);
    };
    const send = (w: Worker) => {
      if (next >= batches) return;
      const batch = next++;
      w.postMessage({ batch, spectra: spectra.slice(batch * BATCH, (batch + 1) * BATCH), settings } satisfies PickRequest);
    };
    for (let t = 0; t < threads; t++) {
      const w = new Worker(workerUrl());
      workers.push(w);
      w.on("message", ({ batch, results: part }: { batch: number; results: PickResult[] }) => {
        for (let k = 0; k < part.length; k++) results[batch * BATCH + k] = part[k];
        if (++done === batches) finish();
        else send(w);
      });
      w.on("error", (e) => finish(e));
      w.on("exit", (code) => {
        if (done < batches && code !== 0) finish(new Error(`a picking thread stopped (exit ${code})`));
      });
      send(w);
    }
  });
}
