/**
 * A worker thread of the command's parallel picking (parallel.ts): picks each batch of spectra it is
 * sent and answers with the picks in the same order.
 */
import { parentPort } from "node:worker_threads";
import { pickOne, type PickRequest } from "./parallel";

parentPort!.on("message", ({ batch, spectra, settings }: PickRequest) => {
  parentPort!.postMessage({ batch, results: spectra.map((s) => pickOne(s, settings)) });
});
