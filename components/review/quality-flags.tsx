import { Badge } from "@/components/ui/badge";
import { QUALITY_FLAG_HELP, QUALITY_FLAG_LABELS, type QualityFlag } from "@/lib/spectra/edges/flags";
import { counted } from "@/lib/format";

/** The short name of a flag, with its plain-words message and what the flag means as a tooltip. */
export function FlagBadges({ flags }: { flags: readonly QualityFlag[] }) {
  if (!flags.length) return null;
  return (
    <span className="inline-flex flex-wrap gap-1" data-testid="flag-badges">
      {flags.map((f, i) => (
        <Badge key={`${f.code}-${i}`} tone="copper" title={`${f.message}\n${QUALITY_FLAG_HELP[f.code] ?? ""}`.trim()}>
          <span aria-hidden>⚑</span> {QUALITY_FLAG_LABELS[f.code] ?? f.code}
        </Badge>
      ))}
    </span>
  );
}

/**
 * A pick's quality flags as a reader of the review screen needs them: the flag, this spectrum's
 * message, and what the flag means in general; and whether the pick was corrected since (the
 * flags describe the data, so they stay) or left out of the fit by the lab's setting.
 */
export function FlagList({
  flags,
  corrected,
  excludedByFlag,
}: {
  flags: readonly QualityFlag[];
  corrected: boolean;
  excludedByFlag: boolean;
}) {
  if (!flags.length) return null;
  return (
    <div className="mt-3 rounded-lg border border-copper/40 bg-copper-soft/40 p-3 text-xs" data-testid="pick-flags">
      <p className="font-semibold text-copper">
        <span aria-hidden>⚑</span> {counted(flags.length, "quality flag")} on the automatic pick
      </p>
      <ul className="mt-1.5 space-y-1.5">
        {flags.map((f, i) => (
          <li key={`${f.code}-${i}`} data-flag={f.code}>
            <span className="font-medium text-ink">{QUALITY_FLAG_LABELS[f.code] ?? f.code}:</span>{" "}
            <span className="text-ink-soft">{f.message}</span>
            {QUALITY_FLAG_HELP[f.code] ? <span className="block text-muted">{QUALITY_FLAG_HELP[f.code]}</span> : null}
          </li>
        ))}
      </ul>
      {corrected ? (
        <p className="mt-1.5 text-ink-soft">
          The pick was corrected by an analyst since; the flags describe the data and stay.
        </p>
      ) : null}
      {excludedByFlag ? (
        <p className="mt-1.5 text-ink-soft">
          Left out of the critical-field fit by the lab&apos;s setting for flagged spectra (a correction by an analyst
          brings it back in).
        </p>
      ) : null}
    </div>
  );
}
