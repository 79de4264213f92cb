/** A row of the lab home's samples table (safe to import in client components). */
export interface SampleSummary {
  id: string;
  name: string;
  material: string;
  substrate: string | null;
  workFunctionEv: number;
  spectraCount: number;
  latestGapEv: number | null;
  latestGapClosed: boolean | null;
  crossingState: "crossed" | "closing" | "none" | null;
  crossingFieldVPerNm: number | null;
  crossingStatus: string | null;
  updatedAt: string;
}

