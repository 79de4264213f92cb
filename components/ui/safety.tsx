/**
 * The usual cautions where the work touches the instrument. Bandcross records measurements; it
 * never drives the microscope, and local rules and trained staff always come first.
 */
export function SafetyNote({ topic }: { topic: "session" | "tip" }) {
  return (
    <aside
      className="rounded-lg border border-copper/30 bg-copper-soft/40 px-4 py-3 text-xs leading-relaxed text-ink-soft"
      aria-label="Safety"
    >
      <p className="font-semibold uppercase tracking-wide text-copper">Safety</p>
      {topic === "session" ? (
        <p className="mt-1">
          Cryostat work involves liquid helium and nitrogen (cold burns, oxygen displacement in closed rooms) and high
          voltages at the piezo drives and tip. Follow your laboratory&apos;s local rules and your instrument&apos;s
          operating procedures, and work under the supervision of trained staff. Bandcross only records what was
          measured; it never controls the instrument.
        </p>
      ) : (
        <p className="mt-1">
          Tip preparation by field emission or voltage pulses uses high voltage at the junction; etching uses caustic
          solutions. Follow your laboratory&apos;s local rules and procedures and ask trained staff before conditioning
          a tip.
        </p>
      )}
    </aside>
  );
}
