import { PLOT_STYLE } from "@/components/plots/plot";
import { niceTicks } from "@/components/plots/ranges";
import {
  NARROW_QUERY,
  outOfFit,
  PHASE_LOOK,
  PHASE_MARGIN,
  phaseMargin,
  type PhaseData,
  type PhasePoint,
  type PhaseRanges,
  regionColors,
  regionOf,
} from "./phase-figure";
import { BAR_Y, FIELD_MODEL_BAR_COLOR, fieldModelBar } from "./field-model-bar";
import { PreviewKey, PreviewTicks } from "./phase-preview-parts";

/**
 * Plotly's plot area inside the phase plot: its margins, with a one-row legend below. Its top
 * (`--phase-top`) and bottom (`--phase-bottom`) follow the plot's on a narrow screen, by a media
 * query: the page is drawn before its width is known.
 */
const AREA = { ...PHASE_MARGIN, b: PHASE_MARGIN.b + 51 };
const TOP = "var(--phase-top)";
const BOTTOM = "var(--phase-bottom)";

/**
 * A still drawing of the phase plot in field mode, rendered with the page (no script needed), shown
 * over the plot's place until the interactive plot has drawn: the points by region, the fitted curve
 * with its band and the critical field, on the same axes. Points are zero-length round-capped
 * strokes in a 1000 × 1000 box stretched over the plot area (`non-scaling-stroke` keeps them round).
 * Rings (flagged picks) and open circles (left out of the fit for their flags) are the same
 * strokes twice, the second narrower in the plot's background colour: one path per layer, never
 * an element per point.
 */
export function PhasePreview(props: {
  data: PhaseData;
  showExcluded: boolean;
  ranges: PhaseRanges;
  legendRoom: number;
}) {
  const { data, showExcluded, ranges: r, legendRoom } = props;
  const X = (v: number) => ((v - r.x[0]) / (r.x[1] - r.x[0])) * 1000;
  const Y = (v: number) => (1 - (v - r.y[0]) / (r.y[1] - r.y[0])) * 1000;
  const f = (v: number) => v.toFixed(1);
  const dotsOf = (pts: PhasePoint[]) =>
    pts.map((p) => `M${f(X(p.field_V_per_nm))} ${f(Y(p.gap_eV * 1000))}h0`).join("");
  const dots = regionColors(data.points).map(({ region, name, color }) => ({
    name,
    color,
    d: dotsOf(data.points.filter((p) => regionOf(p) === region && !outOfFit(p))),
    open: showExcluded ? dotsOf(data.points.filter((p) => regionOf(p) === region && p.excludedByFlag)) : "",
  }));
  const excluded = showExcluded ? dotsOf(data.points.filter((p) => p.excluded)) : "";
  const rings = dotsOf(data.points.filter((p) => p.flags.length > 0 && (showExcluded || !outOfFit(p))));
  const c = data.crossing;
  const curve = "curve" in c && c.curve && c.state !== "none" ? c.curve : null;
  const path = (xs: number[], ys: number[]) => xs.map((x, i) => `${i ? "L" : "M"}${f(X(x))} ${f(Y(ys[i]))}`).join("");
  const meV = (eV: number[]) => eV.map((v) => v * 1000);
  const line = curve ? path(curve.field, meV(curve.gap)) : "";
  // Upper edge left to right, lower edge (clipped at zero) back, closed.
  const lower = curve ? meV(curve.lo.map((v: number) => Math.max(0, v)).reverse()) : [];
  const band = curve ? `${path(curve.field, meV(curve.hi))}L${path([...curve.field].reverse(), lower).slice(1)}Z` : "";
  const ec = c.state === "crossed" && c.field_V_per_nm != null ? c.field_V_per_nm : null;
  const ci = ec != null ? [c.ci95_V_per_nm, "ci95Statistical_V_per_nm" in c ? c.ci95Statistical_V_per_nm : null] : [];
  const bar = fieldModelBar(data.points.filter((p) => showExcluded || !outOfFit(p)));
  const barY = f((1 - BAR_Y) * 1000);
  const barPath = bar ? `M${f(X(bar.x - bar.sigma))} ${barY}H${f(X(bar.x + bar.sigma))}` : "";
  const xTicks = niceTicks(r.x[0], r.x[1], 10);
  const yTicks = niceTicks(r.y[0], r.y[1], 5);
  const narrow = phaseMargin(true, ec != null, legendRoom);
  const narrowVars = `--phase-top: ${narrow.t}px !important; --phase-bottom: ${narrow.b}px !important`;
  return (
    <div
      className="pointer-events-none absolute inset-0 text-[12px] text-ink"
      aria-hidden
      data-testid="phase-preview"
      style={{ ["--phase-top" as string]: `${AREA.t}px`, ["--phase-bottom" as string]: `${AREA.b}px` }}
    >
      <style>{`@media ${NARROW_QUERY} { [data-testid=phase-preview] { ${narrowVars} } }`}</style>
      <div
        className="absolute border-b border-l"
        style={{
          borderColor: PLOT_STYLE.axisLine,
          background: PLOT_STYLE.plotBg,
          left: AREA.l,
          right: AREA.r,
          top: TOP,
          bottom: BOTTOM,
        }}
      >
        <PreviewTicks ranges={r} />
        <svg
          className="absolute inset-0 h-full w-full overflow-visible"
          viewBox="0 0 1000 1000"
          preserveAspectRatio="none"
        >
          {xTicks.map((t) => (
            <line
              key={`gx${t}`}
              x1={f(X(t))}
              x2={f(X(t))}
              y1={0}
              y2={1000}
              stroke={PLOT_STYLE.grid}
              vectorEffect="non-scaling-stroke"
            />
          ))}
          {yTicks.map((t) => (
            <line
              key={`gy${t}`}
              x1={0}
              x2={1000}
              y1={f(Y(t))}
              y2={f(Y(t))}
              stroke={PLOT_STYLE.grid}
              vectorEffect="non-scaling-stroke"
            />
          ))}
          {ci.map((iv, i) =>
            iv ? (
              <rect
                key={i}
                x={f(X(iv[0]))}
                width={f(X(iv[1]) - X(iv[0]))}
                y={0}
                height={1000}
                fill={i ? PHASE_LOOK.ciStatistical : PHASE_LOOK.ciModel}
              />
            ) : null,
          )}
          {barPath ? (
            <path d={barPath} stroke={FIELD_MODEL_BAR_COLOR} strokeWidth={1.5} vectorEffect="non-scaling-stroke" />
          ) : null}
          {band ? <path d={band} fill={PHASE_LOOK.band} /> : null}
          {line ? (
            <path d={line} fill="none" stroke={PHASE_LOOK.fit} strokeWidth={2} vectorEffect="non-scaling-stroke" />
          ) : null}
          {ec != null ? (
            <line
              x1={f(X(ec))}
              x2={f(X(ec))}
              y1={0}
              y2={1000}
              stroke={PHASE_LOOK.fit}
              strokeWidth={1.5}
              strokeDasharray="2 3"
              vectorEffect="non-scaling-stroke"
            />
          ) : null}
          {excluded ? (
            <path
              d={excluded}
              stroke={PHASE_LOOK.excluded}
              strokeWidth={6}
              strokeLinecap="round"
              vectorEffect="non-scaling-stroke"
            />
          ) : null}
          {rings ? (
            <g data-testid="phase-preview-rings">
              <path
                d={rings}
                stroke={PHASE_LOOK.flagRing}
                strokeWidth={15}
                strokeLinecap="round"
                vectorEffect="non-scaling-stroke"
              />
              <path
                d={rings}
                stroke={PLOT_STYLE.plotBg}
                strokeWidth={12}
                strokeLinecap="round"
                vectorEffect="non-scaling-stroke"
              />
            </g>
          ) : null}
          {dots.map((g) =>
            g.d ? (
              <path
                key={g.name}
                d={g.d}
                stroke={g.color}
                strokeWidth={7}
                strokeLinecap="round"
                vectorEffect="non-scaling-stroke"
              />
            ) : null,
          )}
          {dots.map((g) =>
            g.open ? (
              <g key={`open-${g.name}`}>
                <path
                  d={g.open}
                  stroke={g.color}
                  strokeWidth={8}
                  strokeLinecap="round"
                  vectorEffect="non-scaling-stroke"
                />
                <path
                  d={g.open}
                  stroke={PLOT_STYLE.plotBg}
                  strokeWidth={5}
                  strokeLinecap="round"
                  vectorEffect="non-scaling-stroke"
                />
              </g>
            ) : null,
          )}
        </svg>
      </div>
      {ec != null ? (
        <span
          className="absolute -translate-x-1/2 text-copper"
          style={{
            left: `calc(${AREA.l}px + (100% - ${AREA.l + AREA.r}px) * ${(X(ec) / 1000).toFixed(4)})`,
            top: `calc(${TOP} - 20px)`,
          }}
        >
          E<sub>c</sub> = {ec.toFixed(3)} V/nm
        </span>
      ) : null}
      <span
        className="absolute text-[14px]"
        style={{
          left: `calc(${AREA.l}px + (100% - ${AREA.l + AREA.r}px) / 2)`,
          transform: "translateX(-50%)",
          bottom: `calc(${BOTTOM} - 46px)`,
        }}
      >
        estimated field E (V/nm)
      </span>
      <span
        className="absolute left-0 whitespace-nowrap text-[14px]"
        style={{
          top: `calc(${TOP} + (100% - ${TOP} - ${BOTTOM}) / 2)`,
          transform: "translate(-50%, -50%) rotate(-90deg) translateY(24px)",
        }}
      >
        band gap (meV)
      </span>
      <PreviewKey dots={dots} bar={bar} rings={rings !== ""} left={AREA.l} />
    </div>
  );
}
