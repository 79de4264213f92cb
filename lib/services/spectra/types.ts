import "server-only";
import type { QualityFlag } from "@/lib/spectra";

export interface PhasePoint {
  spectrumId: string;
  field_V_per_nm: number;
  fieldSigma_V_per_nm: number | null;
  distance_nm: number | null;
  setpointConductance_S: number | null;
  gap_eV: number;
  gapSigma_eV: number | null;
  closed: boolean;
  source: "auto" | "corrected";
  excluded: boolean;
  region: string | null;
  /** Quality flags of the automatic pick; empty when nothing is in doubt. */
  flags: QualityFlag[];
  /** Left out of the crossing fit by the lab's flagged-spectra setting (`excluded` is by hand). */
  excludedByFlag: boolean;
  /** An analyst accepted this version of the pick as it is (keyboard review's A). */
  accepted: boolean;
}
