/**
 * Query keys of the browser's data cache, in one place so invalidation always matches. Everything
 * the sample page shows (phase data with the crossing, versions and re-analysis progress, crossing
 * events, watch state, gap map) lies under `sample(id)`: when a background job of the sample ends,
 * that one family is invalidated once and every card follows.
 */
export const queryKeys = {
  sessionUploads: (sessionId: string) => ["session", sessionId, "uploads"] as const,
  sessionSpectra: (sessionId: string, params?: Record<string, unknown>) => (params ? (["session", sessionId, "spectra", params] as const) : (["session", sessionId, "spectra"] as const)),
  sample: (sampleId: string) => ["sample", sampleId] as const,
  phase: (sampleId: string) => ["sample", sampleId, "phase"] as const,
  spectrum: (id: string) => ["spectrum", id] as const,
  sampleVersions: (sampleId: string) => ["sample", sampleId, "versions"] as const,
  sampleMap: (sampleId: string, uploadId: string | null) => ["sample", sampleId, "map", uploadId] as const,
};
