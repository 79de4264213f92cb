import "server-only";
import { eq, or, sql, type SQL } from "drizzle-orm";
import { gapPicks, spectra, spectrumAverageMembers, type Crossing, type FlaggedInFit } from "@/db/schema";
import type { CrossingFit } from "@/lib/spectra";

export interface RefitResult {
  previous: Crossing | null;
  current: Crossing;
  fit: CrossingFit;
}

/** The picks a lab's flagged-spectra setting lets into the fit: all, or the unflagged and the corrected. */
export function inFitByFlags(setting: FlaggedInFit): SQL | undefined {
  return setting === "exclude" ? or(eq(gapPicks.source, "corrected"), sql`jsonb_array_length(${gapPicks.flags}) = 0`) : undefined;
}

/** Whether a pick is left out of the fit by the lab's flagged-spectra setting alone (not excluded by hand). */
export function flaggedOutOfFit(setting: FlaggedInFit, p: { source: "auto" | "corrected"; excluded: boolean; flags: readonly unknown[] }): boolean {
  return setting === "exclude" && p.source === "auto" && !p.excluded && p.flags.length > 0;
}

/** Spectra that are members of an average stay out of the crossing fit and the phase plot: the average stands for them. */
export const notInAverage = sql`not exists (select 1 from ${spectrumAverageMembers} m where m.member_id = ${spectra.id})`;
