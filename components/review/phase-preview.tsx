import { COLORS } from "@/components/plots/plot";
import { niceTicks, paddedRange } from "@/components/plots/ranges";
import type { PhaseData } from "./phase-plot";

/** Plotly's plot area inside the 440 px phase plot (its margins with a one-row legend below). */
export const PHASE_AREA = { l: 64, r: 16, t: 28, b: 103 } as const;

const ERROR_BARS_UP_TO = 1500;

const regionOf = (p: PhaseData["points"][number]) => p.region ?? "all regions";

/**
 * The field-mode axis ranges (V/nm, meV) of the phase plot: every shown point with its error bars,
 * the fitted curve and band, and the critical field's interval, padded by 5%; the gap axis from
 * zero. Given to Plotly as fixed ranges so the preview below and the interactive plot line up.
 */
export function fieldModeRanges(data: PhaseData, showExcluded: boolean): { x: [number, number]; y: [number, number] } | null {
  const xs: number[] = [];
  const ys: number[] = [];
  for (const p of data.points) {
    if (p.excluded && !showExcluded) continue;
    const sx = p.fieldSigma_V_per_nm ?? 0;
    const sy = (p.gapSigma_eV ?? 0) * 1000;
    xs.push(p.field_V_per_nm - sx, p.field_V_per_nm + sx);
    ys.push(p.gap_eV * 1000 - sy, p.gap_eV * 1000 + sy);
  }
  const c = data.crossing;
  if ("curve" in c && c.curve && c.state !== "none") {
    xs.push(...c.curve.field);
    ys.push(...c.curve.hi.map((v: number) => v * 1000));
  }
  if (c.state === "crossed" && c.ci95_V_per_nm) xs.push(...c.ci95_V_per_nm);
  const x = paddedRange(xs);
  const y = paddedRange(ys, { includeZero: true });
  return x && y ? { x, y } : null;
}

/**
 * A still drawing of the phase plot in field mode, rendered with the page (no script needed), shown
 * over the plot's place until the interactive plot has drawn: the points by region, the fitted curve
 * with its band and the critical field, on the same axes. Points are zero-length round-capped
 * strokes in a 1000 × 1000 box stretched over the plot area (`non-scaling-stroke` keeps them round).
 */
export function PhasePreview({ data, showExcluded }: { data: PhaseData; showExcluded: boolean }) {
  const r = fieldModeRanges(data, showExcluded);
  if (!r) return null;
  const X = (v: number) => ((v - r.x[0]) / (r.x[1] - r.x[0])) * 1000;
  const Y = (v: number) => (1 - (v - r.y[0]) / (r.y[1] - r.y[0])) * 1000;
  const f = (v: number) => v.toFixed(1);
  const regions = [...new Set(data.points.map(regionOf))].sort();
  const dots = regions.map((region, i) => ({
    region,
    color: COLORS[i % COLORS.length],
    d: data.points
      .filter((p) => regionOf(p) === region && !p.excluded)
      .map((p) => `M${f(X(p.field_V_per_nm))} ${f(Y(p.gap_eV * 1000))}h0`)
      .join(""),
  }));
  const excluded = showExcluded
    ? data.points
        .filter((p) => p.excluded)
        .map((p) => `M${f(X(p.field_V_per_nm))} ${f(Y(p.gap_eV * 1000))}h0`)
        .join("")
    : "";
  const c = data.crossing;
  const curve = "curve" in c && c.curve && c.state !== "none" ? c.curve : null;
  const line = curve ? curve.field.map((x: number, i: number) => `${i ? "L" : "M"}${f(X(x))} ${f(Y(curve.gap[i] * 1000))}`).join("") : "";
  const band = curve
    ? [...curve.field.map((x: number, i: number) => `${i ? "L" : "M"}${f(X(x))} ${f(Y(curve.hi[i] * 1000))}`), ...curve.field.map((x: number, i: number) => `L${f(X(x))} ${f(Y(Math.max(0, curve.lo[i]) * 1000))}`).reverse(), "Z"].join("")
    : "";
  const ec = c.state === "crossed" && c.field_V_per_nm != null ? c.field_V_per_nm : null;
  const ci = ec != null ? [c.ci95_V_per_nm, "ci95Statistical_V_per_nm" in c ? c.ci95Statistical_V_per_nm : null] : [];
  // Error bars as Plotly draws them, for samples small enough to be drawn as SVG there too.
  const bars =
    data.points.length <= ERROR_BARS_UP_TO
      ? data.points
          .filter((p) => showExcluded || !p.excluded)
          .map((p) => {
            const x = X(p.field_V_per_nm);
            const y = Y(p.gap_eV * 1000);
            const sx = p.fieldSigma_V_per_nm ?? 0;
            const sy = (p.gapSigma_eV ?? 0) * 1000;
            return `M${f(X(p.field_V_per_nm - sx))} ${f(y)}H${f(X(p.field_V_per_nm + sx))}M${f(x)} ${f(Y(p.gap_eV * 1000 - sy))}V${f(Y(p.gap_eV * 1000 + sy))}`;
          })
          .join("")
      : "";
  const xTicks = niceTicks(r.x[0], r.x[1], 10);
  const yTicks = niceTicks(r.y[0], r.y[1], 5);
  const pct = (v: number, lo: number, hi: number) => `${(((v - lo) / (hi - lo)) * 100).toFixed(3)}%`;
  return (
    <div className="pointer-events-none absolute inset-0 text-[12px] text-ink" aria-hidden data-testid="phase-preview">
      <div className="absolute border-b border-l border-[#cfc6b4] bg-[#fffdf8]" style={{ left: PHASE_AREA.l, right: PHASE_AREA.r, top: PHASE_AREA.t, bottom: PHASE_AREA.b }}>
        {xTicks.map((t) => (
          <span key={`x${t}`} className="absolute top-full mt-2 -translate-x-1/2" style={{ left: pct(t, r.x[0], r.x[1]) }}>
            {t}
          </span>
        ))}
        {yTicks.map((t) => (
          <span key={`y${t}`} className="absolute right-full mr-2 translate-y-1/2" style={{ bottom: pct(t, r.y[0], r.y[1]) }}>
            {t}
          </span>
        ))}
        <svg className="absolute inset-0 h-full w-full overflow-visible" viewBox="0 0 1000 1000" preserveAspectRatio="none">
          {xTicks.map((t) => (
            <line key={`gx${t}`} x1={f(X(t))} x2={f(X(t))} y1={0} y2={1000} stroke="#ece6d8" vectorEffect="non-scaling-stroke" />
          ))}
          {yTicks.map((t) => (
            <line key={`gy${t}`} x1={0} x2={1000} y1={f(Y(t))} y2={f(Y(t))} stroke="#ece6d8" vectorEffect="non-scaling-stroke" />
          ))}
          {ci.map((iv, i) => (iv ? <rect key={i} x={f(X(iv[0]))} width={f(X(iv[1]) - X(iv[0]))} y={0} height={1000} fill={i ? "rgba(185,81,42,0.16)" : "rgba(185,81,42,0.05)"} /> : null))}
          {bars ? <path d={bars} stroke="rgba(110,106,95,0.35)" strokeWidth={1} vectorEffect="non-scaling-stroke" /> : null}
          {band ? <path d={band} fill="rgba(185,81,42,0.14)" /> : null}
          {line ? <path d={line} fill="none" stroke="#b9512a" strokeWidth={2} vectorEffect="non-scaling-stroke" /> : null}
          {ec != null ? <line x1={f(X(ec))} x2={f(X(ec))} y1={0} y2={1000} stroke="#b9512a" strokeWidth={1.5} strokeDasharray="2 3" vectorEffect="non-scaling-stroke" /> : null}
          {excluded ? <path d={excluded} stroke="#8a8478" strokeWidth={6} strokeLinecap="round" vectorEffect="non-scaling-stroke" /> : null}
          {dots.map((g) => (g.d ? <path key={g.region} d={g.d} stroke={g.color} strokeWidth={7} strokeLinecap="round" vectorEffect="non-scaling-stroke" /> : null))}
        </svg>
      </div>
      {ec != null ? (
        <span className="absolute -translate-x-1/2 text-copper" style={{ left: `calc(${PHASE_AREA.l}px + (100% - ${PHASE_AREA.l + PHASE_AREA.r}px) * ${(X(ec) / 1000).toFixed(4)})`, top: PHASE_AREA.t - 20 }}>
          E<sub>c</sub> = {ec.toFixed(3)} V/nm
        </span>
      ) : null}
      <span className="absolute text-[14px]" style={{ left: `calc(${PHASE_AREA.l}px + (100% - ${PHASE_AREA.l + PHASE_AREA.r}px) / 2)`, transform: "translateX(-50%)", bottom: PHASE_AREA.b - 46 }}>
        estimated field E (V/nm)
      </span>
      <span className="absolute left-0 whitespace-nowrap text-[14px]" style={{ top: `calc(${PHASE_AREA.t}px + (100% - ${PHASE_AREA.t + PHASE_AREA.b}px) / 2)`, transform: "translate(-50%, -50%) rotate(-90deg) translateY(24px)" }}>
        band gap (meV)
      </span>
      <div className="absolute bottom-4 flex flex-wrap items-center gap-x-4 gap-y-1 text-[11px]" style={{ left: PHASE_AREA.l }}>
        {dots.map((g) => (
          <span key={g.region} className="inline-flex items-center gap-1.5">
            <span className="inline-block h-2 w-2 rounded-full" style={{ background: g.color }} />
            {g.region}
          </span>
        ))}
        <span className="rounded bg-white/80 px-2 py-0.5 text-xs text-muted">drawing the interactive plot…</span>
      </div>
    </div>
  );
}
