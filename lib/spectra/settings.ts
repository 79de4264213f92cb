/**
 * Settings with their zod schemas. Every default lives here and only here: DEFAULT_EXTRACTION_SETTINGS,
 * DEFAULT_FIELD_MODEL, DEFAULT_IMPORT_LIMITS, DEFAULT_CROSSING_OPTIONS,
 * DEFAULT_BARRIER_FIT_OPTIONS.
 */
import { z } from "zod";
import type { ImportLimits } from "./import/types";

/** Every number of the settings says so when it is missing or text ("two", an empty form field sent as null). */
const number = () => z.number({ error: "must be a number" }).finite();
const positive = number().positive("must be above zero");

/** Freeze an object and everything inside it, so that a shared default cannot be changed by accident. */
function deepFreeze<T>(o: T): T {
  if (o && typeof o === "object") {
    for (const v of Object.values(o)) deepFreeze(v);
    Object.freeze(o);
  }
  return o;
}
const nonNegative = number().nonnegative("cannot be negative");

export const extractionSettingsSchema = z.object({
  smoothing: z.object({
    /** Filter used for the smoothed curve that the threshold reads. */
    method: z.enum(["savitzky-golay", "gaussian", "fft", "none"]),
    /** Savitzky–Golay window, mV; null = windowPerResolution × the spectrum's resolution. */
    window_mV: positive.nullable(),
    /** Savitzky–Golay polynomial order. */
    order: number().int().min(0).max(6),
    /** Gaussian σ, mV; null = windowPerResolution × resolution / 2.355 (a Gaussian whose FWHM is the automatic window). */
    gaussianSigma_mV: positive.nullable(),
    /** FFT low-pass: shortest period kept, mV; null = windowPerResolution × resolution. */
    fftCutoff_mV: positive.nullable(),
    /** Automatic window as a multiple of the resolution (FWHM). */
    windowPerResolution: positive,
    /** Fewest points in an automatic Savitzky–Golay window. */
    minWindowPoints: z.number().int().min(3),
  }),
  threshold: z.object({
    /** Edge where the smoothed signal exceeds floor + k·σ_smoothed … */
    k: positive,
    /** … for this many consecutive points (at least the smoothing window's width in points). */
    consecutive: number().int().min(1).max(50),
    /**
     * A band edge is a sustained rise: the signal stays above the threshold for at least this many mV
     * (and 3 resolutions), or to the end of the search range; shorter runs are slow noise.
     */
    sustain_mV: nonNegative,
  }),
  /** The in-gap baseline (edges/baseline.ts): a robust polynomial fitted to the quiet region. */
  baseline: z.object({
    /** Highest polynomial degree (0 = a flat floor). */
    maxDegree: number().int().min(0).max(2),
    /** The quiet region must span this many mV per degree above 0. */
    widthPerDegree_mV: positive,
    /**
     * Before the flat first look is used, look for a tilted or curved floor under which the gap is one
     * long quiet run whose ends rise like band onsets (edges/noise.ts: quietTilt, quietCurve).
     */
    tiltedLook: z.boolean(),
  }),
  /** Restrict the search for the gap to this bias range (V); null = whole spectrum. */
  search: z.object({ minBias_V: number().nullable(), maxBias_V: number().nullable() }),
  fit: z.object({
    /** Refine each edge by fitting the broadened onset model (edges/fit.ts). */
    enabled: z.boolean(),
    /** Fit window on the band side of an edge, in resolutions (FWHM) … */
    bandWindowPerResolution: positive,
    /** … but at least this many mV. */
    minBandWindow_mV: positive,
  }),
  closed: z.object({
    /**
     * A spectrum is one continuous V (closed or nearly closed) when a + b·V + v·|V − m| explains its
     * band windows and the middle of its gap to within this many standard errors (edges/pick.ts).
     */
    vShapeMaxDeviation: positive,
  }),
  /** "No gap" when the floor exceeds this fraction of the 95th-percentile signal (metallic spectrum). */
  metallicFloorRatio: positive.max(1),
  /** Used when a spectrum's metadata has no temperature, K. */
  assumedTemperature_K: nonNegative,
  /** Used when a spectrum's metadata has no lock-in modulation, mV rms. */
  assumedLockinModulation_mV_rms: nonNegative,
  /**
   * The view the gap is picked on (prepare/normalise.ts): raw dI/dV (`none`), (dI/dV)/(I/V) with I/V
   * broadened by an exponential of width `broadening_mV` (`feenstra`), or dI/dV ÷ I_set/V_set (`setpoint`).
   */
  normalisation: z.object({
    method: z.enum(["none", "feenstra", "setpoint"]),
    broadening_mV: positive,
  }),
});
export type ExtractionSettings = z.infer<typeof extractionSettingsSchema>;

export const DEFAULT_EXTRACTION_SETTINGS: ExtractionSettings = deepFreeze({
  smoothing: {
    method: "savitzky-golay",
    window_mV: null,
    order: 2,
    gaussianSigma_mV: null,
    fftCutoff_mV: null,
    windowPerResolution: 1.5,
    minWindowPoints: 5,
  },
  threshold: { k: 3, consecutive: 3, sustain_mV: 40 },
  baseline: { maxDegree: 2, widthPerDegree_mV: 60, tiltedLook: true },
  search: { minBias_V: null, maxBias_V: null },
  fit: { enabled: true, bandWindowPerResolution: 4, minBandWindow_mV: 30 },
  closed: { vShapeMaxDeviation: 1 },
  metallicFloorRatio: 0.2,
  assumedTemperature_K: 4.5,
  assumedLockinModulation_mV_rms: 0,
  normalisation: { method: "none", broadening_mV: 100 },
});

export const fieldModelSchema = z.object({
  tipWorkFunction_eV: positive,
  tipWorkFunctionSigma_eV: nonNegative,
  sampleWorkFunction_eV: positive,
  sampleWorkFunctionSigma_eV: nonNegative,
  /** Distance at which the junction conducts G₀, nm. */
  contactDistance_nm: nonNegative,
  contactDistanceSigma_nm: nonNegative,
  /** Measured apparent barrier height, eV; null = mean of the two work functions. */
  barrierHeight_eV: positive.nullable(),
  /** Standard uncertainty of the measured barrier height, eV (e.g. from the κ of I(z) curves); 0 = none given. */
  barrierHeightSigma_eV: nonNegative.default(0),
  /**
   * Without a measured barrier: how far the true apparent barrier may lie from the work functions'
   * mean, eV (a standard uncertainty of the assumption itself, beyond the work functions' own).
   */
  assumedBarrierSigma_eV: nonNegative.default(0),
  /** Field divided by this factor (1 = no screening). */
  screening: number().min(1),
});
export type FieldModel = z.infer<typeof fieldModelSchema>;

/**
 * How far an apparent barrier height measured by I(z) commonly lies from the mean of the two work
 * functions: image-potential lowering, tip shape and adsorbates put it anywhere from about the mean
 * to 1–2 eV below it (common practice, from memory). 1 eV as a standard uncertainty says so; a
 * measured κ (I(z) curves) replaces the assumption and its uncertainty.
 */
export const ASSUMED_BARRIER_SIGMA_EV = 1;

/** Tungsten tip (Michaelson 1977: 4.55 eV, from memory) on a sample of 4.5 eV; σ 0.1 eV each. */
export const DEFAULT_FIELD_MODEL: FieldModel = Object.freeze({
  tipWorkFunction_eV: 4.55,
  tipWorkFunctionSigma_eV: 0.1,
  sampleWorkFunction_eV: 4.5,
  sampleWorkFunctionSigma_eV: 0.1,
  contactDistance_nm: 0.25,
  contactDistanceSigma_nm: 0.05,
  barrierHeight_eV: null,
  barrierHeightSigma_eV: 0,
  assumedBarrierSigma_eV: ASSUMED_BARRIER_SIGMA_EV,
  screening: 1,
}) as FieldModel;

export const importLimitsSchema = z.object({
  maxFileBytes: z.number().int().positive(),
  maxColumns: z.number().int().min(2),
  maxPoints: z.number().int().positive(),
  minPoints: z.number().int().min(2),
  maxZipEntries: z.number().int().positive(),
  maxZipExpandedBytes: z.number().int().positive(),
  maxZipRatio: z.number().positive(),
});

export const DEFAULT_IMPORT_LIMITS: ImportLimits = Object.freeze({
  maxFileBytes: 64 * 1024 * 1024,
  maxColumns: 10_001,
  maxPoints: 100_000,
  minPoints: 10,
  maxZipEntries: 2_000,
  maxZipExpandedBytes: 512 * 1024 * 1024,
  maxZipRatio: 200,
});

export const crossingOptionsSchema = z.object({
  /** Levels of evidence: "crossed" needs BIC(line) − BIC(V) ≥ this. */
  minDeltaBic: positive,
  /** Fewest points on each side of the critical field for "crossed". */
  minPointsPerSide: z.number().int().min(1),
  /** Slopes on both sides must differ from zero by this many standard errors. */
  minSlopeSignificance: positive,
  /** Relative, fully correlated field-scale uncertainty (from the field model) added to the interval. */
  systematicFieldRelSigma: nonNegative,
  /** Points in the drawn curve. */
  curvePoints: z.number().int().min(2),
});
export type CrossingOptions = z.infer<typeof crossingOptionsSchema>;

export const DEFAULT_CROSSING_OPTIONS: CrossingOptions = Object.freeze({
  minDeltaBic: 6,
  minPointsPerSide: 2,
  minSlopeSignificance: 3,
  systematicFieldRelSigma: 0,
  curvePoints: 101,
}) as CrossingOptions;

/** The I(z) fit (barrier/fit.ts): how the exponential range is found and what is flagged. */
export const barrierFitOptionsSchema = z.object({
  /** Fewest points a sweep must keep on the exponential to be fitted. */
  minPoints: z.number().int().min(3),
  /** Points count on the exponential only where the fitted current exceeds this many noise-floor σ. */
  floorK: positive,
  /** A point at either end of the range leaves it when its residual exceeds this many σ. */
  endTrimSigma: positive,
  /** A point inside the range is an outlier (a spike) beyond this many σ. */
  spikeSigma: positive,
  /** Three or more points within this fraction of the largest |I| are the preamplifier's saturation. */
  saturationTolerance: positive.max(0.5),
  /** The current "changes sign" when the other sign reaches this fraction of the main one's maximum. */
  signChangeRatio: positive.max(1),
  /** Flag a curve whose ln|I| bends: the curvature is this many standard errors from zero … */
  curvatureSigma: positive,
  /** … and changes the slope by more than this fraction across the range. */
  curvatureRelSlope: positive,
  /** Flag a fit over fewer decades of current than this. */
  minDecades: positive,
  /** Flag an apparent barrier height outside this range, eV. */
  barrierRange_eV: z.tuple([nonNegative, positive]),
  /** Flag approach and retraction whose κ differ by more than this many combined σ. */
  sweepsDisagreeSigma: positive,
  /** Flag a curve whose current scatters about the exponential by more than this fraction (rms). */
  noisyRelScatter: positive,
});
export type BarrierFitOptions = z.infer<typeof barrierFitOptionsSchema>;

export const DEFAULT_BARRIER_FIT_OPTIONS: BarrierFitOptions = deepFreeze({
  minPoints: 6,
  floorK: 10,
  endTrimSigma: 3.5,
  spikeSigma: 5,
  saturationTolerance: 1e-4,
  signChangeRatio: 0.1,
  curvatureSigma: 4,
  curvatureRelSlope: 0.1,
  minDecades: 1,
  // Apparent barriers of clean metal junctions lie near 3–5 eV, and lower ones (to ~1 eV) are
  // common on real tips and samples; below 0.5 eV or above 8 eV something else is measured
  // (common practice).
  barrierRange_eV: [0.5, 8] as [number, number],
  sweepsDisagreeSigma: 3,
  noisyRelScatter: 0.1,
});

export function resolveBarrierFitOptions(partial?: Partial<BarrierFitOptions>): BarrierFitOptions {
  return barrierFitOptionsSchema.parse({ ...DEFAULT_BARRIER_FIT_OPTIONS, ...partial });
}

type DeepPartial<T> = { [K in keyof T]?: T[K] extends object | null ? DeepPartial<NonNullable<T[K]>> | T[K] : T[K] };

function deepMerge<T>(base: T, over: unknown): T {
  if (over === undefined || over === null || typeof over !== "object" || Array.isArray(over)) return base;
  const out: Record<string, unknown> = { ...(base as Record<string, unknown>) };
  for (const [k, v] of Object.entries(over as Record<string, unknown>)) {
    const b = out[k];
    out[k] = b && typeof b === "object" && !Array.isArray(b) && v && typeof v === "object" ? deepMerge(b, v) : v;
  }
  return out as T;
}

/** Settings this module has validated and frozen: passing one back in needs no second check. */
const resolved = new WeakSet<object>();

/**
 * Defaults overlaid with a partial input, validated (throws a ZodError on invalid values), and
 * frozen. A result passed back in is returned as it is: picking a grid passes the same settings
 * thousands of times, and validating them each time was 5% of the picking (34 µs a spectrum).
 */
export function resolveExtractionSettings(partial?: DeepPartial<ExtractionSettings>): ExtractionSettings {
  if (partial && resolved.has(partial)) return partial as ExtractionSettings;
  const out = deepFreeze(extractionSettingsSchema.parse(deepMerge(DEFAULT_EXTRACTION_SETTINGS, partial)));
  resolved.add(out);
  return out;
}
export function resolveFieldModel(partial?: Partial<FieldModel>): FieldModel {
  return fieldModelSchema.parse({ ...DEFAULT_FIELD_MODEL, ...partial });
}
export function resolveCrossingOptions(partial?: Partial<CrossingOptions>): CrossingOptions {
  return crossingOptionsSchema.parse({ ...DEFAULT_CROSSING_OPTIONS, ...partial });
}
export function resolveImportLimits(partial?: Partial<ImportLimits>): ImportLimits {
  return importLimitsSchema.parse({ ...DEFAULT_IMPORT_LIMITS, ...partial });
}
export type { DeepPartial };
