export { pickGap, type GapPick, type PickInput } from "./pick";
export { fitEdges } from "./fit";
export { noiseFloor } from "./noise";
export { thresholdEdgeUp, thresholdEdgeDown, logOnset } from "./threshold";
