export * from "./auth";
export * from "./lab";
export * from "./spectra";
export * from "./crossings";
export * from "./audit";
export * from "./curves";
