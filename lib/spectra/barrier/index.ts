/** I(z) approach curves: the synthetic model, the fit of κ and the apparent barrier, its flags. */
export { makeApproachCurve, type ApproachModel, type SyntheticApproach } from "./model";
export {
  APPARENT_BARRIER_EV_ANGSTROM2,
  BarrierFitError,
  POINT_STATUS,
  barrierHeightFromKappa_eV,
  combineKappas,
  fitBarrier,
  splitSweeps,
  type ApproachCurve,
  type BarrierFit,
  type KappaEstimate,
  type PointStatus,
  type SweepFit,
} from "./fit";
export {
  BARRIER_FLAG_CODES,
  BARRIER_FLAG_HELP,
  BARRIER_FLAG_LABELS,
  type BarrierFlag,
  type BarrierFlagCode,
} from "./flags";
