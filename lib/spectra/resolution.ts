/**
 * Energy resolution of a tunnelling spectrum and the broadening kernels behind it.
 *
 * A measured dI/dV(V) is the sample's spectrum convolved with
 *  - the thermal kernel −∂f/∂E = 1 / (4 k_BT cosh²(E / 2k_BT)) (Fermi–Dirac derivative; FWHM
 *    4·ln(1+√2)·k_BT ≈ 3.5255 k_BT), and
 *  - the first-harmonic lock-in instrumental function for V = V₀ + V_m cos ωt,
 *    (2 / π V_m²) √(V_m² − V²) for |V| < V_m (a semicircle; FWHM √3·V_m), with V_m = √2·V_rms.
 *    Source: J. Klein, A. Léger, M. Belin, D. Défourneau & M. J. L. Sangster, Phys. Rev. B 7, 2336 (1973).
 * The combined resolution reported on every pick is the quadrature sum of the two FWHMs (common
 * practice; it overestimates the FWHM of the exact convolution by up to ~12%).
 *
 * Units: temperature in K, modulation in mV rms, widths in mV unless the name says V.
 */
import { BOLTZMANN_EV_PER_K, LOCKIN_FWHM_PER_VPEAK, THERMAL_FWHM_PER_KT } from "./constants";

/** FWHM of −∂f/∂E at temperature T, in mV. */
export function thermalFwhm_mV(T_K: number): number {
  if (!(T_K >= 0)) throw new RangeError(`temperature must be ≥ 0 K, got ${T_K}`);
  return THERMAL_FWHM_PER_KT * BOLTZMANN_EV_PER_K * T_K * 1000;
}

/** FWHM of the first-harmonic lock-in kernel for an rms modulation, in mV: √3·√2·V_rms ≈ 2.449 V_rms. */
export function lockinFwhm_mV(vrms_mV: number): number {
  if (!(vrms_mV >= 0)) throw new RangeError(`lock-in modulation must be ≥ 0 mV rms, got ${vrms_mV}`);
  return LOCKIN_FWHM_PER_VPEAK * Math.SQRT2 * vrms_mV;
}

/** Combined resolution √(thermal² + lock-in²), in mV. */
export function energyResolution_mV(T_K: number, vrms_mV: number): number {
  return Math.hypot(thermalFwhm_mV(T_K), lockinFwhm_mV(vrms_mV));
}

/** Thermal kernel −∂f/∂E at energy x (V), per V. */
export function thermalKernel(x_V: number, T_K: number): number {
  const kT = BOLTZMANN_EV_PER_K * T_K;
  const c = Math.cosh(x_V / (2 * kT));
  return 1 / (4 * kT * c * c);
}

/** Lock-in kernel (2/πV_m²)√(V_m² − x²) at x (V) for peak modulation V_m (V), per V. */
export function lockinKernel(x_V: number, vpeak_V: number): number {
  const r2 = vpeak_V * vpeak_V - x_V * x_V;
  return r2 > 0 ? (2 / (Math.PI * vpeak_V * vpeak_V)) * Math.sqrt(r2) : 0;
}

function thermalCdf(x: number, kT: number): number {
  if (kT <= 0) return x > 0 ? 1 : x < 0 ? 0 : 0.5;
  return 1 / (1 + Math.exp(-x / kT));
}

function lockinCdf(x: number, R: number): number {
  if (R <= 0) return x > 0 ? 1 : x < 0 ? 0 : 0.5;
  if (x <= -R) return 0;
  if (x >= R) return 1;
  return 0.5 + (x * Math.sqrt(R * R - x * x) + R * R * Math.asin(x / R)) / (Math.PI * R * R);
}

/** Full width at half maximum of a sampled peak (linear interpolation of the half-height crossings). */
export function fwhmOf(x: ArrayLike<number>, y: ArrayLike<number>): number {
  let im = 0;
  for (let i = 1; i < y.length; i++) if (y[i] > y[im]) im = i;
  const half = y[im] / 2;
  let l = im;
  while (l > 0 && y[l] > half) l--;
  let r = im;
  while (r < y.length - 1 && y[r] > half) r++;
  const xl = x[l] + ((half - y[l]) * (x[l + 1] - x[l])) / (y[l + 1] - y[l]);
  const xr = x[r - 1] + ((half - y[r - 1]) * (x[r] - x[r - 1])) / (y[r] - y[r - 1]);
  return xr - xl;
}

/**
 * The combined (thermal ⊗ lock-in) kernel as tables on a uniform grid, with its running integrals
 * K₁(x) = ∫_{−∞}^{x} K, M₁(x) = ∫_{−∞}^{x} u K(u) du and M₂(x) = ∫_{−∞}^{x} u² K(u) du, which turn the
 * convolution of a step, a ramp and a parabola with K into closed forms (see edges/fit.ts).
 */
export interface BroadeningKernel {
  T_K: number;
  vrms_mV: number;
  /** Grid spacing of the tables, V. */
  h: number;
  /** Half-width of the support, V (K = 0 beyond ±halfWidth to < 1e-7 of its mass). */
  halfWidth: number;
  /** Table abscissae x_i = −halfWidth + i·h, at cell edges. */
  n: number;
  k1: Float64Array;
  m1: Float64Array;
  m2: Float64Array;
  /** Second moment of the kernel, V² (= M₂(∞)). */
  variance: number;
}

const kernelCache = new Map<string, BroadeningKernel>();
let lastKernel: BroadeningKernel | null = null;
let lastH: number | undefined;

/**
 * Build (and cache) the combined kernel tables for temperature T and lock-in modulation V_rms.
 * @param T_K temperature, K (≥ 0)
 * @param vrms_mV lock-in modulation, mV rms (≥ 0)
 * @param h_V table spacing in V; default 1/60 of the resolution, at most 0.25 mV
 */
export function broadeningKernel(T_K: number, vrms_mV: number, h_V?: number): BroadeningKernel {
  if (lastKernel && lastKernel.T_K === T_K && lastKernel.vrms_mV === vrms_mV && lastH === h_V) return lastKernel;
  const res_V = Math.max(energyResolution_mV(T_K, vrms_mV) / 1000, 1e-5);
  const h = h_V ?? Math.min(res_V / 60, 2.5e-4);
  const key = `${T_K}:${vrms_mV}:${h}`;
  const hit = kernelCache.get(key);
  if (hit) {
    lastKernel = hit;
    lastH = h_V;
    return hit;
  }
  const kT = BOLTZMANN_EV_PER_K * T_K;
  const R = Math.SQRT2 * (vrms_mV / 1000);
  const tw = 18 * kT + h; // thermal tail mass beyond 18 kT ≈ 1.5e-8
  const nt = Math.ceil(tw / h);
  const nl = Math.ceil((R + h) / h);
  // Cell masses on cells centred at j·h.
  const pt = new Float64Array(2 * nt + 1);
  for (let j = -nt; j <= nt; j++) pt[j + nt] = thermalCdf((j + 0.5) * h, kT) - thermalCdf((j - 0.5) * h, kT);
  const pl = new Float64Array(2 * nl + 1);
  for (let j = -nl; j <= nl; j++) pl[j + nl] = lockinCdf((j + 0.5) * h, R) - lockinCdf((j - 0.5) * h, R);
  const nc = nt + nl;
  const pc = new Float64Array(2 * nc + 1);
  for (let a = 0; a < pt.length; a++) {
    const va = pt[a];
    if (va === 0) continue;
    for (let b = 0; b < pl.length; b++) pc[a + b] += va * pl[b];
  }
  let tot = 0;
  for (let i = 0; i < pc.length; i++) tot += pc[i];
  for (let i = 0; i < pc.length; i++) pc[i] /= tot;
  // Cumulative tables at cell edges: edge i sits at (i − nc − 0.5)·h, i = 0 … 2nc+1.
  const n = pc.length + 1;
  const k1 = new Float64Array(n);
  const m1 = new Float64Array(n);
  const m2 = new Float64Array(n);
  for (let i = 0; i < pc.length; i++) {
    const x = (i - nc) * h;
    k1[i + 1] = k1[i] + pc[i];
    m1[i + 1] = m1[i] + pc[i] * x;
    m2[i + 1] = m2[i] + pc[i] * (x * x + (h * h) / 12);
  }
  // Remove the rounding residue of the (symmetric) first moment.
  const m1end = m1[n - 1];
  for (let i = 0; i < n; i++) m1[i] -= (m1end * i) / (n - 1);
  const kernel: BroadeningKernel = {
    T_K,
    vrms_mV,
    h,
    halfWidth: (nc + 0.5) * h,
    n,
    k1,
    m1,
    m2,
    variance: m2[n - 1],
  };
  if (kernelCache.size > 64) kernelCache.clear();
  kernelCache.set(key, kernel);
  lastKernel = kernel;
  lastH = h_V;
  return kernel;
}

/**
 * Convolution of the onset functions with the kernel, evaluated at offset x (V) from the edge:
 * returns [K∗H](x), [K∗(t·H)](x), [K∗(t²·H)](x), where H is the unit step at 0.
 * Written into `out` (length 3) to avoid allocation in fitting loops.
 */
export function convolvedOnset(kern: BroadeningKernel, x: number, out: Float64Array): void {
  const { halfWidth, h, n, k1, m1, m2, variance } = kern;
  if (x <= -halfWidth) {
    out[0] = 0;
    out[1] = 0;
    out[2] = 0;
    return;
  }
  if (x >= halfWidth) {
    out[0] = 1;
    out[1] = x;
    out[2] = x * x + variance;
    return;
  }
  const pos = (x + halfWidth) / h;
  let i = Math.floor(pos);
  if (i >= n - 1) i = n - 2;
  const f = pos - i;
  const K = k1[i] + f * (k1[i + 1] - k1[i]);
  const M1 = m1[i] + f * (m1[i + 1] - m1[i]);
  const M2 = m2[i] + f * (m2[i + 1] - m2[i]);
  out[0] = K;
  out[1] = x * K - M1;
  out[2] = x * x * K - 2 * x * M1 + M2;
}
