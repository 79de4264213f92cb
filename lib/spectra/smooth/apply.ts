/**
 * Apply the smoothing chosen in the extraction settings, with windows in mV turned into points on the
 * spectrum's own axis, and report the filter's noise gain (from its impulse response).
 */
import type { ExtractionSettings } from "../settings";
import { savgolFilter } from "./savgol";
import { gaussianSmooth } from "./gaussian";
import { fftLowpass } from "./fft";

export interface Smoothed {
  s: Float64Array;
  /** √(Σ h²) of the impulse response at the centre: σ_smoothed / σ_raw for white noise. */
  gain: number;
  /** σ(y − s)/σ(y) for white noise: √(1 − 2h₀ + Σh²). */
  residualGain: number;
  description: string;
  /** Width of the filter in points (window, or ±2σ for Gaussian, cut-off period for FFT). */
  windowPoints: number;
}

/** Odd number of points closest to width/step, clamped to [min, n] (n made odd downward). */
export function oddWindow(width_V: number, step_V: number, min: number, n: number): number {
  let w = Math.round(width_V / step_V);
  if (w % 2 === 0) w += 1;
  w = Math.max(w, min % 2 ? min : min + 1);
  const nOdd = n % 2 ? n : n - 1;
  return Math.min(w, nOdd);
}

const gainCache = new Map<string, [number, number]>();

export function smoothSpectrum(y: Float64Array, step_V: number, resolution_mV: number, st: ExtractionSettings["smoothing"]): Smoothed {
  const n = y.length;
  let apply: (v: Float64Array) => Float64Array;
  let description: string;
  let windowPoints = 1;
  let key = "";
  const auto_mV = Math.max(resolution_mV * st.windowPerResolution, 1e-6);
  if (st.method === "savitzky-golay") {
    const w = oddWindow((st.window_mV ?? auto_mV) / 1000, step_V, Math.max(st.minWindowPoints, st.order + 2), n);
    const order = Math.min(st.order, w - 1);
    apply = (v) => savgolFilter(v, w, order);
    windowPoints = w;
    key = `sg:${w}:${order}`;
    description = `Savitzky–Golay ${w} points (${(w * step_V * 1000).toFixed(1)} mV), order ${order}`;
  } else if (st.method === "gaussian") {
    const sigma_mV = st.gaussianSigma_mV ?? auto_mV / 2.3548;
    const sp = Math.max(sigma_mV / 1000 / step_V, 0.5);
    apply = (v) => gaussianSmooth(v, sp);
    windowPoints = Math.max(1, Math.round(4 * sp));
    key = `g:${sp}`;
    description = `Gaussian σ = ${(sp * step_V * 1000).toFixed(2)} mV`;
  } else if (st.method === "fft") {
    const cut = Math.max((st.fftCutoff_mV ?? auto_mV) / 1000 / step_V, 2.5);
    apply = (v) => fftLowpass(v, cut);
    windowPoints = Math.max(1, Math.round(cut));
    key = `f:${cut}`;
    description = `FFT low-pass, shortest period ${(cut * step_V * 1000).toFixed(1)} mV`;
  } else {
    return { s: Float64Array.from(y), gain: 1, residualGain: 0, description: "no smoothing", windowPoints: 1 };
  }
  const s = apply(y);
  // The noise gain depends only on the filter and the length: cache it.
  key += `:${n}`;
  const hit = gainCache.get(key);
  if (hit) return { s, gain: hit[0], residualGain: hit[1], description, windowPoints };
  const imp = new Float64Array(n);
  const c = n >> 1;
  imp[c] = 1;
  const h = apply(imp);
  let ss = 0;
  for (let i = 0; i < n; i++) ss += h[i] * h[i];
  if (gainCache.size > 256) gainCache.clear();
  gainCache.set(key, [Math.sqrt(ss), Math.sqrt(Math.max(1 - 2 * h[c] + ss, 1e-12))]);
  return { s, gain: Math.sqrt(ss), residualGain: Math.sqrt(Math.max(1 - 2 * h[c] + ss, 1e-12)), description, windowPoints };
}
