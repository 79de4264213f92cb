/** Preparing spectra before a gap is read: averaging repeats, normalised conductance, the current from dI/dV. */
export { PrepareError } from "./errors";
export { cumulativeTrapezoid, currentFromDidv } from "./trapezoid";
export { commonAxis, onAxis, type CommonAxis } from "./axis";
export {
  averageSpectra,
  assertSamePoint,
  SETPOINT_REL_TOLERANCE,
  POSITION_TOLERANCE_nm,
  type AverageMember,
  type AveragedSpectrum,
  type AverageOptions,
  type LeftOutMember,
} from "./average";
export {
  normaliseSpectrum,
  feenstraNormalise,
  setpointNormalise,
  NORMALISATIONS,
  type Normalisation,
  type NormaliseInput,
  type NormaliseOptions,
  type Normalised,
} from "./normalise";
export { pointGroups, declaredRepeats, type PointGroup, type PointGroups } from "./points";
export { pickOnView, type PickedView, type ViewInput } from "./view";
