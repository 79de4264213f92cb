/**
 * Bandcross analysis core: pure functions on typed arrays, no framework, database or network.
 * Methods, units, defaults and sources: lib/spectra/README.md.
 */
export * from "./constants";
export { makeRng, type Rng } from "./random";
export { median, quantile, madSigma, MAD_TO_SIGMA, linearLeastSquares, type LeastSquaresResult } from "./stats";
export {
  extractionSettingsSchema,
  DEFAULT_EXTRACTION_SETTINGS,
  fieldModelSchema,
  ASSUMED_BARRIER_SIGMA_EV,
  DEFAULT_FIELD_MODEL,
  importLimitsSchema,
  DEFAULT_IMPORT_LIMITS,
  crossingOptionsSchema,
  DEFAULT_CROSSING_OPTIONS,
  resolveExtractionSettings,
  resolveFieldModel,
  resolveCrossingOptions,
  resolveImportLimits,
  barrierFitOptionsSchema,
  DEFAULT_BARRIER_FIT_OPTIONS,
  resolveBarrierFitOptions,
  type BarrierFitOptions,
  type ExtractionSettings,
  type FieldModel,
  type CrossingOptions,
} from "./settings";
export { importApproachCurves, importUpload, fileKind, type ImportedCurveFile, type ParsedCurve } from "./import";
export { importSpectra, derivativeOfCurrent, ImportError, type ImportLimits, type ImportedFile, type ParsedSpectrum, type SpectrumMeta } from "./import";
export { savgolFilter, savgolWeights, gaussianSmooth, fftLowpass } from "./smooth";
export { smoothSpectrum, type Smoothed } from "./smooth/apply";
export {
  thermalFwhm_mV,
  lockinFwhm_mV,
  energyResolution_mV,
  thermalKernel,
  lockinKernel,
  broadeningKernel,
  convolvedOnset,
  fwhmOf,
  type BroadeningKernel,
} from "./resolution";
export { compareRepeats, repeatGroups, type RepeatInput } from "./edges";
export { pickGap, QUALITY_FLAG_CODES, QUALITY_FLAG_LABELS, QUALITY_FLAG_HELP, type GapPick, type PickInput, type QualityFlag, type QualityFlagCode } from "./edges";
export { tunnellingDistance, decayConstant_per_nm, apparentBarrierHeight_eV, type TunnellingDistanceInput } from "./distance";
export { estimateField, fieldAssumptions, kappaSourceText, OWN_FIELD_REL_SIGMA, sharedField, type FieldEstimate, type KappaSourceOf } from "./field";
export { fitCrossing, fitSweep, type CrossingPoint, type CrossingFit } from "./crossing";
export { makeSpectrum, makeSweep, makeNoise, makeRepeats, modelDidv, sweepGap_eV, type SpectrumModel, type SyntheticSpectrum, type SweepModel, type SyntheticSweepPoint } from "./synthetic";
export { spectrumToCsv, columnsToCsv, approachToCsv } from "./write";
export * from "./prepare";
export * from "./barrier";
