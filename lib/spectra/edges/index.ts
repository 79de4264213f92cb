export { pickGap, type GapPick, type PickInput } from "./pick";
export { fitEdges } from "./fit";
export { noiseFloor } from "./noise";
export { sustainedEdge, logOnset } from "./threshold";
export { QUALITY_FLAG_CODES, QUALITY_FLAG_LABELS, QUALITY_FLAG_HELP, type QualityFlag, type QualityFlagCode } from "./flags";
export { compareRepeats, repeatGroups, type RepeatInput } from "./repeats";
