/**
 * Normalised conductance, to separate the sample's density of states from the tunnelling transmission
 * (which grows roughly exponentially with |V| and with the junction's conductance).
 *
 * `feenstra`: (dI/dV)/(I/V), R. M. Feenstra, J. A. Stroscio & A. P. Fein, Surf. Sci. 181, 295 (1987).
 * Inside a gap both I and V → 0 and I/V is noise over nothing, so I/V is broadened first, as
 * P. Mårtensson & R. M. Feenstra, Phys. Rev. B 39, 7744 (1989) and R. M. Feenstra, Phys. Rev. B 50,
 * 4561 (1994) do (form from memory): the convolution of I/V with an exponential,
 *   ‾(I/V)‾(V) = ∫ (I(V′)/V′) e^{−|V′−V|/ΔV} dV′ / ∫ e^{−|V′−V|/ΔV} dV′,
 * with ΔV comparable to the gap (`broadening_mV`, default 100 mV: the gaps Bandcross reads are 0–0.3 eV).
 * Dividing by the kernel's integral over the measured range makes the ratio 1 for an ohmic junction
 * everywhere, ends included (I = V/R: dI/dV = I/V = 1/R). The integrals are two exponential recursions
 * (forward and backward) on trapezoid weights, O(n). At V = 0, I/V is its limit dI/dV(0).
 * The current: a current column when the spectrum has one (its offset at 0 V removed, and the lock-in's
 * dI/dV, in its own units, scaled to the current's numerical derivative by least squares, so that the
 * ratio has no units); otherwise rebuilt from dI/dV by the cumulative trapezoid with I(0) = 0, with a
 * warning that it is reconstructed.
 *
 * `setpoint`: dI/dV ÷ (I_set/V_set), the junction's conductance where the feedback was opened. At
 * constant height the whole curve scales with the setpoint conductance (the tip height sets the
 * transmission), so spectra taken at different setpoints can be overlaid.
 *
 * The standard error of an averaged spectrum is divided by the same denominator (whose own error, from
 * the smooth, broadened current, is left out).
 */
import { PrepareError } from "./errors";
import { currentFromDidv } from "./trapezoid";

export const NORMALISATIONS = ["none", "feenstra", "setpoint"] as const;
export type Normalisation = (typeof NORMALISATIONS)[number];

export interface NormaliseInput {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  current_A?: ArrayLike<number> | null;
  stderr?: ArrayLike<number> | null;
  meta?: { setpoint_bias_V?: number; setpoint_current_A?: number };
}

export interface NormaliseOptions {
  method: Normalisation;
  /** ΔV of the exponential broadening of I/V (Feenstra), mV. */
  broadening_mV: number;
}

export interface Normalised {
  method: Normalisation;
  values: Float64Array;
  stderr: Float64Array | null;
  /** What dI/dV was divided by at each bias. */
  denominator: Float64Array;
  /** The current was rebuilt from dI/dV (Feenstra without a current column). */
  currentReconstructed: boolean;
  /** Plain words saying what was done. */
  description: string;
  warnings: string[];
}

/** y ÷ d pointwise (one d for all when d has one value); by |d| for a standard error. */
function divided(y: ArrayLike<number>, d: ArrayLike<number>, magnitude = false): Float64Array {
  const out = new Float64Array(y.length);
  for (let i = 0; i < y.length; i++) {
    const di = d.length === 1 ? d[0] : d[i];
    out[i] = y[i] / (magnitude ? Math.abs(di) : di);
  }
  return out;
}

/** Trapezoid weights of a (possibly non-uniform) ascending axis. */
function trapezoidWeights(x: ArrayLike<number>): Float64Array {
  const n = x.length;
  const w = new Float64Array(n);
  for (let i = 1; i < n; i++) {
    const h = 0.5 * (x[i] - x[i - 1]);
    w[i - 1] += h;
    w[i] += h;
  }
  return w;
}

/** Σ_j w_j f_j e^{−|x_j − x_i|/width} for every i, by a forward and a backward recursion. */
function exponentialSum(x: ArrayLike<number>, w: Float64Array, f: ArrayLike<number> | null, width: number): Float64Array {
  const n = x.length;
  const fw = new Float64Array(n);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const own = w[i] * (f ? f[i] : 1);
    fw[i] = own + (i ? Math.exp(-(x[i] - x[i - 1]) / width) * fw[i - 1] : 0);
  }
  let back = 0;
  for (let i = n - 1; i >= 0; i--) {
    const own = w[i] * (f ? f[i] : 1);
    back = own + (i < n - 1 ? Math.exp(-(x[i + 1] - x[i]) / width) * back : 0);
    out[i] = fw[i] + back - own;
  }
  return out;
}

/** Numerical derivative (central differences inside, one-sided at the ends). */
function gradient(y: ArrayLike<number>, x: ArrayLike<number>): Float64Array {
  const n = y.length;
  const g = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - 1);
    const b = Math.min(n - 1, i + 1);
    g[i] = (y[b] - y[a]) / (x[b] - x[a]);
  }
  return g;
}

function valueAtZero(x: ArrayLike<number>, y: ArrayLike<number>): number {
  const n = x.length;
  let j = 0;
  while (j < n - 2 && x[j + 1] < 0) j++;
  const f = Math.min(1, Math.max(0, (0 - x[j]) / (x[j + 1] - x[j])));
  return y[j] + f * (y[j + 1] - y[j]);
}

/** (dI/dV)/‾(I/V)‾ with the exponential broadening (see the head of the file). */
export function feenstraNormalise(input: NormaliseInput, broadening_mV: number): Normalised {
  const x = input.bias_V;
  const n = x.length;
  if (!(broadening_mV > 0)) throw new PrepareError("the broadening of I/V must be above zero");
  if (!(x[0] <= 0 && x[n - 1] >= 0))
    throw new PrepareError("the bias range does not include 0 V: (dI/dV)/(I/V) needs the current through 0 V");
  const warnings: string[] = [];
  let scale = 1;
  let current: Float64Array;
  let reconstructed = false;
  if (input.current_A) {
    const i0 = valueAtZero(x, input.current_A);
    current = new Float64Array(n);
    for (let i = 0; i < n; i++) current[i] = input.current_A[i] - i0;
    let top = 0;
    for (const v of current) top = Math.max(top, Math.abs(v));
    if (Math.abs(i0) > 0.01 * top) warnings.push(`current offset at 0 V (${(i0 * 1e12).toPrecision(3)} pA) removed`);
    // The lock-in's dI/dV in its own units, scaled to the current's derivative (least squares).
    const d = gradient(current, x);
    let sxy = 0;
    let sxx = 0;
    for (let i = 0; i < n; i++) {
      sxy += input.didv[i] * d[i];
      sxx += input.didv[i] * input.didv[i];
    }
    scale = sxx > 0 ? sxy / sxx : NaN;
    if (!(Math.abs(scale) > 0) || !Number.isFinite(scale))
      throw new PrepareError("dI/dV and the derivative of the current do not follow each other; cannot normalise");
  } else {
    current = currentFromDidv(x, input.didv);
    reconstructed = true;
    warnings.push("no current column: the current is rebuilt by integrating dI/dV (cumulative trapezoid, I(0) = 0)");
  }
  const r = new Float64Array(n);
  const g0 = valueAtZero(x, input.didv) * scale;
  for (let i = 0; i < n; i++) r[i] = Math.abs(x[i]) < 1e-12 ? g0 : current[i] / x[i];
  const w = trapezoidWeights(x);
  const width = broadening_mV / 1000;
  const num = exponentialSum(x, w, r, width);
  const den = exponentialSum(x, w, null, width);
  const broadened = new Float64Array(n);
  let pos = 0;
  let neg = 0;
  for (let i = 0; i < n; i++) {
    broadened[i] = num[i] / den[i];
    if (broadened[i] > 0) pos++;
    else if (broadened[i] < 0) neg++;
  }
  if (pos !== n && neg !== n)
    throw new PrepareError("the broadened I/V changes sign: the current does not follow the bias; cannot normalise");
  // The lock-in's own dI/dV over the broadened I/V expressed in its units.
  const denominator = new Float64Array(n);
  for (let i = 0; i < n; i++) denominator[i] = broadened[i] / scale;
  return {
    method: "feenstra",
    values: divided(input.didv, denominator),
    stderr: input.stderr ? divided(input.stderr, denominator, true) : null,
    denominator,
    currentReconstructed: reconstructed,
    description:
      `normalised conductance (dI/dV)/(I/V), I/V broadened by an exponential of width ${broadening_mV} mV ` +
      `(Feenstra); current ${reconstructed ? "rebuilt from dI/dV (cumulative trapezoid, I(0) = 0)" : "from the current column"}`,
    warnings,
  };
}

/** dI/dV ÷ (I_set/V_set). */
export function setpointNormalise(input: NormaliseInput): Normalised {
  const vset = input.meta?.setpoint_bias_V;
  const iset = input.meta?.setpoint_current_A;
  if (vset === undefined || iset === undefined)
    throw new PrepareError("the setpoint (bias and current) is not known, so dI/dV cannot be divided by I_set/V_set");
  if (vset === 0 || iset === 0) throw new PrepareError("a setpoint bias or current of zero has no conductance to divide by");
  const gset = iset / vset;
  const n = input.didv.length;
  return {
    method: "setpoint",
    values: divided(input.didv, [gset]),
    stderr: input.stderr ? divided(input.stderr, [gset], true) : null,
    denominator: new Float64Array(n).fill(gset),
    currentReconstructed: false,
    description: `dI/dV divided by the setpoint conductance I_set/V_set = ${(gset * 1e9).toPrecision(3)} nS`,
    warnings: [],
  };
}

/** The view the settings name: raw (`none`), Feenstra or setpoint-normalised. */
export function normaliseSpectrum(input: NormaliseInput, options: NormaliseOptions): Normalised {
  if (options.method === "feenstra") return feenstraNormalise(input, options.broadening_mV);
  if (options.method === "setpoint") return setpointNormalise(input);
  const n = input.didv.length;
  return {
    method: "none",
    values: new Float64Array(input.didv),
    stderr: input.stderr ? new Float64Array(input.stderr) : null,
    denominator: new Float64Array(n).fill(1),
    currentReconstructed: false,
    description: "raw dI/dV",
    warnings: [],
  };
}
