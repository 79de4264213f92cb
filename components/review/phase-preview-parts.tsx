import { niceTicks } from "@/components/plots/ranges";
import { type FieldModelBar, fieldModelBarText } from "./field-model-bar";
import { PHASE_LOOK, type PhaseRanges } from "./phase-figure";

const pct = (v: number, lo: number, hi: number) => `${(((v - lo) / (hi - lo)) * 100).toFixed(3)}%`;

/** The still preview's tick labels, placed in percent of the plot area (its width is not known yet). */
export function PreviewTicks({ ranges: r }: { ranges: PhaseRanges }) {
  const xTicks = niceTicks(r.x[0], r.x[1], 10);
  const yTicks = niceTicks(r.y[0], r.y[1], 5);
  return (
    <>
      {xTicks.map((t) => (
        <span
          key={`x${t}`}
          className="absolute top-full mt-2 -translate-x-1/2"
          style={{ left: pct(t, r.x[0], r.x[1]) }}
        >
          {t}
        </span>
      ))}
      {yTicks.map((t) => (
        <span
          key={`y${t}`}
          className="absolute right-full mr-2 translate-y-1/2"
          style={{ bottom: pct(t, r.y[0], r.y[1]) }}
        >
          {t}
        </span>
      ))}
    </>
  );
}

/** The still preview's one-row key: the series, the field model's bar, the rings, and that it is a stand-in. */
export function PreviewKey(props: {
  dots: { name: string; color: string }[];
  bar: FieldModelBar | null;
  rings: boolean;
  left: number;
}) {
  const { dots, bar, rings, left } = props;
  return (
    <div className="absolute bottom-4 flex flex-wrap items-center gap-x-4 gap-y-1 text-[11px]" style={{ left }}>
      {dots.map((g) => (
        <span key={g.name} className="inline-flex items-center gap-1.5">
          <span className="inline-block h-2 w-2 rounded-full" style={{ background: g.color }} />
          {g.name}
        </span>
      ))}
      {bar ? <span>⟷ {fieldModelBarText(bar)}</span> : null}
      {rings ? (
        <span className="inline-flex items-center gap-1.5">
          <span
            className="inline-block h-3 w-3 rounded-full border-[1.5px]"
            style={{ borderColor: PHASE_LOOK.flagRing }}
          />
          flagged
        </span>
      ) : null}
      <span className="rounded bg-white/80 px-2 py-0.5 text-xs text-muted">drawing the interactive plot…</span>
    </div>
  );
}
