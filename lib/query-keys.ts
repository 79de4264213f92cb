/** Query keys of the browser's data cache, in one place so invalidation always matches. */
export const queryKeys = {
  sessionUploads: (sessionId: string) => ["session", sessionId, "uploads"] as const,
  sessionSpectra: (sessionId: string, params?: Record<string, unknown>) => (params ? (["session", sessionId, "spectra", params] as const) : (["session", sessionId, "spectra"] as const)),
  phase: (sampleId: string) => ["sample", sampleId, "phase"] as const,
  spectrum: (id: string) => ["spectrum", id] as const,
  sampleVersions: (sampleId: string) => ["sample", sampleId, "versions"] as const,
};
