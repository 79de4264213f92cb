import "server-only";
import { and, asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { approachCurves, measurementSessions, tips, type ApproachCurveRow } from "@/db/schema";
import { combineKappas } from "@/lib/spectra";

/** A stored curve as the API and the pages show it (arrays only when asked for: they are large). */
export function curveView(r: ApproachCurveRow, withData: boolean) {
  return {
    id: r.id,
    sessionId: r.sessionId,
    tipId: r.tipId,
    uploadId: r.uploadId,
    file: r.sourceName,
    index: r.indexInFile,
    label: r.label,
    status: r.fitStatus,
    message: r.fitMessage,
    warnings: r.warnings,
    kappa_per_nm: r.kappaPerNm,
    kappaSigma_per_nm: r.kappaSigmaPerNm,
    barrierHeight_eV: r.barrierHeightEv,
    barrierHeightSigma_eV: r.barrierHeightSigmaEv,
    pointsUsed: r.pointsUsed,
    nPoints: r.nPoints,
    flags: r.flags,
    sweeps: r.sweeps,
    setpointBias_V: r.setpointBiasV,
    setpointCurrent_A: r.setpointCurrentA,
    ...(withData ? { z_nm: Array.from(r.zNm), current_A: Array.from(r.currentA), pointStatus: r.pointStatus } : {}),
  };
}
export type CurveView = ReturnType<typeof curveView>;

/** The weighted κ of the fitted curves among `rows` (combineKappas), or null when none was fitted. */
export function kappaOf(rows: readonly Pick<ApproachCurveRow, "fitStatus" | "kappaPerNm" | "kappaSigmaPerNm">[]) {
  const ok = rows.filter((r) => r.fitStatus === "ok" && r.kappaPerNm != null && r.kappaSigmaPerNm != null);
  if (ok.length === 0) return null;
  const c = combineKappas(ok.map((r) => ({ kappa_per_nm: r.kappaPerNm!, kappaSigma_per_nm: r.kappaSigmaPerNm! })));
  return { ...c, curves: ok.length };
}

/** A session or tip of a sample whose fitted I(z) curves a field model may take κ from. */
export interface CurveChoice {
  scope: "session" | "tip";
  id: string;
  /** "session of 2026-11-20 (W-17)", "tip W-17". */
  label: string;
  curves: number;
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
}

/** One fitted curve of a sample, for a chosen set: where it came from and its own κ. */
export interface SetCurve {
  id: string;
  /** "gx12-iz-2.csv #0, session of 2026-11-20 (W-17)". */
  label: string;
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
  /** Its flags' codes (not-exponential, sweeps-disagree, …): worth a look before choosing it. */
  flags: string[];
}

/**
 * The sessions and tips of a sample with fitted I(z) curves, each with its weighted κ, and the
 * fitted curves one by one (`curves`), for a set chosen by hand.
 */
export async function curveChoicesOf(db: DbOrTx, labId: string, sampleId: string): Promise<{ choices: CurveChoice[]; curves: SetCurve[] }> {
  const rows = await db
    .select({ c: approachCurves, date: measurementSessions.date, tip: tips.label })
    .from(approachCurves)
    .innerJoin(measurementSessions, eq(measurementSessions.id, approachCurves.sessionId))
    .leftJoin(tips, eq(tips.id, approachCurves.tipId))
    .where(
      and(eq(approachCurves.labId, labId), eq(approachCurves.sampleId, sampleId), eq(approachCurves.fitStatus, "ok")),
    )
    .orderBy(asc(measurementSessions.date));
  const groups = new Map<string, { scope: "session" | "tip"; id: string; label: string; rows: ApproachCurveRow[] }>();
  for (const r of rows) {
    const keys: ["session" | "tip", string | null, string][] = [
      ["session", r.c.sessionId, `session of ${r.date}${r.tip ? ` (${r.tip})` : ""}`],
      ["tip", r.c.tipId, `tip ${r.tip}`],
    ];
    for (const [scope, id, label] of keys) {
      if (!id) continue;
      const g = groups.get(`${scope}:${id}`) ?? { scope, id, label, rows: [] };
      g.rows.push(r.c);
      groups.set(`${scope}:${id}`, g);
    }
  }
  const choices = [...groups.values()].map((g) => {
    const k = kappaOf(g.rows)!;
    return {
      scope: g.scope,
      id: g.id,
      label: g.label,
      curves: k.curves,
      kappa_per_nm: k.kappa_per_nm,
      kappaSigma_per_nm: k.kappaSigma_per_nm,
    };
  });
  const curves = rows.map((r) => ({
    id: r.c.id,
    label: `${r.c.sourceName} #${r.c.indexInFile}, session of ${r.date}${r.tip ? ` (${r.tip})` : ""}`,
    kappa_per_nm: r.c.kappaPerNm!,
    kappaSigma_per_nm: r.c.kappaSigmaPerNm!,
    flags: r.c.flags.map((f) => f.code),
  }));
  return { choices, curves };
}
