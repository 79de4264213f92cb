/**
 * A worker thread of the command's parallel picking (parallel.ts): picks each batch of spectra it is
 * sent and answers with the picks in the same order.
 */
import { parentPort } from "node:worker_threads";
import { resolveExtractionSettings } from "../spectra";
import { pickOne, type PickRequest } from "./parallel";

parentPort!.on("message", ({ batch, spectra, settings }: PickRequest) => {
  // The settings arrive as a copy: checked once a batch, not once a spectrum.
  const st = resolveExtractionSettings(settings);
  parentPort!.postMessage({ batch, results: spectra.map((s) => pickOne(s, st)) });
});
