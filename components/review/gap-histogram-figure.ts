import { axis, baseLayout, COLORS } from "@/components/plots/plot";
import { madSigma, median, quantile } from "@/lib/spectra";
import { outOfFit, PHASE_LOOK, PHASE_MARGIN, type PhasePoint } from "./phase-figure";

/** At most this many bins, however spread the gaps. */
export const MAX_BINS = 40;

const NICE = [1, 2, 5, 10];

/** The smallest of 1, 2 and 5 × 10^k at or above w (w > 0). */
export function niceStep(w: number): number {
  const k = 10 ** Math.floor(Math.log10(w));
  return (NICE.find((m) => m * k >= w * (1 - 1e-9)) ?? 10) * k;
}

/** The nearest (by ratio) of 1, 2 and 5 × 10^k to w (w > 0). */
export function nearestNice(w: number): number {
  const k = 10 ** Math.floor(Math.log10(w));
  return NICE.map((m) => m * k).reduce((a, b) => (Math.abs(Math.log(b / w)) < Math.abs(Math.log(a / w)) ? b : a));
}

export interface GapBins {
  /** Bin width, meV. */
  width: number;
  /** Bin edges, meV: one more than the counts, on multiples of the width. */
  edges: number[];
}

/**
 * Bins for a histogram of gaps (meV): the Freedman–Diaconis width 2·IQR·n^(−1/3) (Freedman &
 * Diaconis 1981) to the nearest 1, 2 or 5 × 10^k, but no finer than the gaps' median uncertainty
 * (finer bins would draw the picks' noise) and wider still if more than MAX_BINS would be needed;
 * edges on multiples of the width, covering every gap.
 */
export function gapBins(gaps_meV: readonly number[], sigmas_meV: readonly (number | null)[]): GapBins | null {
  const gaps = gaps_meV.filter(Number.isFinite);
  if (!gaps.length) return null;
  const lo = Math.min(...gaps);
  const hi = Math.max(...gaps);
  const sig = sigmas_meV.filter((s): s is number => s != null && s > 0);
  const fd = 2 * (quantile(gaps, 0.75) - quantile(gaps, 0.25)) * gaps.length ** (-1 / 3);
  const floor = Math.max(sig.length ? median(sig) : 0, (hi - lo) / MAX_BINS, 0.1);
  let width = Math.max(fd > 0 ? nearestNice(fd) : 0, niceStep(floor));
  while (Math.floor(hi / width) - Math.floor(lo / width) + 1 > MAX_BINS) width = niceStep(width * 1.01);
  const first = Math.floor(lo / width);
  const n = Math.floor(hi / width) - first + 1;
  return { width, edges: Array.from({ length: n + 1 }, (_, i) => Number(((first + i) * width).toPrecision(12))) };
}

/** How many of the gaps fall in each bin [edge i, edge i+1). */
export function countInBins(gaps_meV: readonly number[], { width, edges }: GapBins): number[] {
  const counts = new Array<number>(edges.length - 1).fill(0);
  for (const g of gaps_meV) {
    if (!Number.isFinite(g)) continue;
    const i = Math.min(counts.length - 1, Math.max(0, Math.floor((g - edges[0]) / width + 1e-9)));
    counts[i]++;
  }
  return counts;
}

/** The numbers the histogram's caption gives: the gaps in the fit, their median and robust spread. */
export function gapSummary(points: readonly PhasePoint[]) {
  const gaps = points.filter((p) => !outOfFit(p)).map((p) => p.gap_eV * 1000);
  return {
    n: gaps.length,
    left: points.length - gaps.length,
    median_meV: gaps.length ? median(gaps) : null,
    spread_meV: gaps.length > 1 ? madSigma(gaps) : null,
  };
}

/**
 * The histogram of a sample whose spectra sit at one field: the gaps in the fit as a filled step
 * outline, those out of the fit (excluded, or left out for their flags) as a grey outline in the
 * same bins when shown, and the median gap as a dotted line. Hovering a bin says its range and
 * count (an invisible marker per bin carries [from, to, count]).
 */
export function gapHistogramFigure(points: readonly PhasePoint[], showExcluded: boolean) {
  const inFit = points.filter((p) => !outOfFit(p));
  const out = showExcluded ? points.filter(outOfFit) : [];
  const meV = (ps: readonly PhasePoint[]) => ps.map((p) => p.gap_eV * 1000);
  const bins = gapBins(
    meV([...inFit, ...out]),
    [...inFit, ...out].map((p) => (p.gapSigma_eV == null ? null : p.gapSigma_eV * 1000)),
  );
  const traces: Record<string, unknown>[] = [];
  const series = (ps: readonly PhasePoint[], name: string, color: string, fill: boolean) => {
    if (!bins || !ps.length) return;
    const counts = countInBins(meV(ps), bins);
    const steps = [...counts, counts[counts.length - 1]];
    traces.push({
      type: "scatter",
      mode: "lines",
      x: bins.edges,
      y: steps,
      line: { shape: "hv", color, width: 1.5, ...(fill ? {} : { dash: "dot" }) },
      ...(fill ? { fill: "tozeroy", fillcolor: `${color}33` } : {}),
      name,
      hoverinfo: "skip",
      legendgroup: name,
    });
    traces.push({
      type: "scatter",
      mode: "markers",
      x: counts.map((_, i) => (bins.edges[i] + bins.edges[i + 1]) / 2),
      y: counts,
      customdata: counts.map((c, i) => [bins.edges[i], bins.edges[i + 1], c]),
      marker: { size: 12, opacity: 0 },
      showlegend: false,
      legendgroup: name,
      hovertemplate: `%{customdata[2]} ${name}<br>gap %{customdata[0]:.1f}–%{customdata[1]:.1f} meV<extra></extra>`,
    });
  };
  series(inFit, "spectra in the fit", COLORS[0], true);
  series(out, "excluded or left out of the fit", PHASE_LOOK.excluded, false);
  const { median_meV } = gapSummary(points);
  const shapes =
    median_meV == null
      ? []
      : [
          {
            type: "line",
            xref: "x",
            yref: "paper",
            x0: median_meV,
            x1: median_meV,
            y0: 0,
            y1: 1,
            line: { color: PHASE_LOOK.fit, width: 1.5, dash: "dot" },
          },
        ];
  const annotations =
    median_meV == null
      ? []
      : [
          {
            x: median_meV,
            y: 1,
            xref: "x",
            yref: "paper",
            yanchor: "bottom",
            showarrow: false,
            text: `median ${median_meV.toFixed(1)} meV`,
            font: { color: PHASE_LOOK.fit, size: 12 },
          },
        ];
  return {
    data: traces,
    layout: baseLayout({
      xaxis: axis(
        "band gap (meV)",
        bins ? { range: [bins.edges[0] - bins.width / 2, bins.edges[bins.edges.length - 1] + bins.width / 2] } : {},
      ),
      yaxis: axis("spectra", { rangemode: "tozero", tickformat: "d", dtick: undefined }),
      shapes,
      annotations,
      margin: PHASE_MARGIN,
      hovermode: "closest",
    }),
  };
}
