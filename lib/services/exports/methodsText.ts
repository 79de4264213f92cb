import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { spectra } from "@/db/schema";
import { fieldAssumptions, type ExtractionSettings } from "@/lib/spectra";
import { loadSampleAnalysis } from "../analysis/loadSampleAnalysis";
import type { Ctx } from "@/lib/base/context";
import { getPhase } from "../spectra/getPhase";
import { counted, fileStem } from "@/lib/format";

/** What the gap was read on, when it is not the raw dI/dV; repeats averaged. */
function viewWords(s: ExtractionSettings, averaged: boolean): string {
  const n = s.normalisation ?? { method: "none", broadening_mV: 100 };
  const averages = !averaged
    ? ""
    : "Repeats at one point were averaged (the mean with its standard error; a repeat differing from the others beyond their noise by a leave-one-out variance ratio was left out), and an average stood for its repeats. ";
  if (n.method === "feenstra")
    return `${averages}Gaps were read on the normalised conductance (dI/dV)/(I/V) (Feenstra, Stroscio and Fein, Surf. Sci. 181, 295 (1987)), with I/V broadened by an exponential of width ${n.broadening_mV} mV (Feenstra, Phys. Rev. B 50, 4561 (1994)); where a spectrum had no current, the current was rebuilt by integrating dI/dV with I(0) = 0. `;
  if (n.method === "setpoint") return `${averages}Gaps were read on dI/dV divided by the setpoint conductance I_set/V_set. `;
  return averages;
}

function smoothingWords(s: ExtractionSettings): string {
  const sm = s.smoothing;
  const auto = `${sm.windowPerResolution}× the energy resolution of each spectrum`;
  switch (sm.method) {
    case "savitzky-golay":
      return `Savitzky–Golay smoothing (order ${sm.order}, window ${sm.window_mV ? `${sm.window_mV} mV` : auto}; Savitzky and Golay, Anal. Chem. 36, 1627 (1964))`;
    case "gaussian":
      return `Gaussian smoothing (σ ${sm.gaussianSigma_mV ? `${sm.gaussianSigma_mV} mV` : `set from ${auto}`})`;
    case "fft":
      return `an FFT low-pass filter with mirrored padding (shortest period kept ${sm.fftCutoff_mV ? `${sm.fftCutoff_mV} mV` : auto})`;
    default:
      return "no smoothing";
  }
}

/** A methods paragraph built from the settings actually used, for a paper to cite. */
export async function methodsText({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  const phase = await getPhase({ ctx, input });
  const a = await loadSampleAnalysis({ ctx, input });
  const model = a.modelFor(null);
  const s = a.settings;
  const c = phase.crossing;
  const [{ n: averages }] = await ctx.db
    .select({ n: sql<number>`count(*)::int` })
    .from(spectra)
    .where(and(eq(spectra.sampleId, a.sample.id), eq(spectra.kind, "average")));
  const averaged = averages > 0;
  const n = phase.points.filter((p) => !p.excluded && !p.excludedByFlag).length;
  const corrected = phase.points.filter((p) => p.source === "corrected").length;
  const excluded = phase.points.filter((p) => p.excluded).length;
  const flagged = phase.points.filter((p) => p.flags.length > 0).length;
  const flaggedOut = phase.points.filter((p) => p.excludedByFlag).length;
  const flagWords = !flagged
    ? ""
    : flaggedOut
      ? ` ${counted(flagged, "automatic pick")} carried a quality flag (a reason the pick may not be trusted); ${flaggedOut} of them, not corrected by hand, ${flaggedOut > 1 ? "were" : "was"} left out of the fit.`
      : ` ${counted(flagged, "pick")} carried a quality flag (a reason the pick may not be trusted) and ${flagged > 1 ? "were" : "was"} kept in the fit.`;
  const result =
    c.state === "crossed" && c.field_V_per_nm != null
      ? `The gap closes and reopens at an estimated critical field of ${c.field_V_per_nm.toFixed(3)} V/nm${c.ci95_V_per_nm ? ` (95% interval ${c.ci95_V_per_nm[0].toFixed(3)}–${c.ci95_V_per_nm[1].toFixed(3)} V/nm, including the work-function and contact-distance uncertainties)` : ""}, from a V-shaped fit of gap versus field weighted by both error bars and preferred over a monotonic line by the Bayesian information criterion.`
      : c.state === "closing"
        ? "The gap decreases with field but does not reopen within the measured range; no critical field is claimed."
        : "No field dependence of the gap could be established.";
  const text = [
    `Band edges were extracted from ${n} dI/dV spectra of ${phase.sample.name} (${corrected} corrected by hand, ${excluded} excluded with a recorded reason) with Bandcross extraction settings version ${a.settingsVersion.version}.${flagWords}`,
    `${viewWords(s, averaged)}Each spectrum was smoothed with ${smoothingWords(s)}. The in-gap baseline was a robust polynomial (degree up to ${s.baseline.maxDegree}, chosen by a penalised χ²) fitted to the gap between the edges${s.baseline.tiltedLook === false ? "" : " (found first under a tilt or curve where the gap is one quiet run beneath it)"}, iterated with them, and the noise was estimated from the median absolute deviation of the residuals about it (σ ≈ 1.4826 MAD), with their autocorrelation taken into account; a band edge was placed where the smoothed signal exceeded the baseline by ${s.threshold.k}σ for at least ${s.threshold.consecutive} consecutive points in a rise sustained over ${s.threshold.sustain_mV} mV, interpolated between samples${s.fit.enabled ? ", and then refined by fitting an onset model convolved with the thermal (−∂f/∂E, FWHM 3.5 k_BT) and first-harmonic lock-in kernels, so that the reported edges are unbroadened" : ""}. A spectrum was reported as closed within resolution only where it was one V-shaped minimum without a flat floor and its gap was below the combined energy resolution √((3.5 k_BT)² + (2.45 V_rms)²) or consistent with zero. Edge uncertainties combine the fit's, inflated for correlated noise, with the profile of each edge's fit, and picks whose edges the data do not fix are marked with a quality flag.`,
    `Tip–sample distances were estimated as d = d_c + ln(G₀/G_set)/(2κ) + Δz with G₀ = 2e²/h, G_set = |I_set/V_set| and κ = √(2m_eφ)/ħ (field model version ${a.fieldVersion.version}: ${model.barrierHeight_eV == null ? "φ the mean of the tip and sample work functions" : `φ = ${model.barrierHeight_eV} eV, a measured apparent barrier height`}, d_c = ${model.contactDistance_nm} ± ${model.contactDistanceSigma_nm} nm), and the junction field as E = (Φ_tip − Φ_sample)/(e·d)${model.screening !== 1 ? `, divided by a screening factor of ${model.screening}` : ""}, with the sample work function ${model.sampleWorkFunction_eV} ± ${model.sampleWorkFunctionSigma_eV} eV and each session's tip work function. Field uncertainties were propagated from the work-function and contact-distance uncertainties. The field is a model estimate: ${fieldAssumptions(model).slice(0, 3).join("; ")}.`,
    result,
  ].join("\n\n");
  return { fileName: `${fileStem(phase.sample.name)}-methods.txt`, text };
}
