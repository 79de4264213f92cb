export { savgolFilter, savgolWeights } from "./savgol";
export { gaussianSmooth } from "./gaussian";
export { fftLowpass } from "./fft";
