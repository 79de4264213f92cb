export function BrandMark({ inverted = false, compact = false }: { inverted?: boolean; compact?: boolean }) {
  return (
    <span className="inline-flex items-center gap-2.5">
      <svg viewBox="0 0 32 32" className="h-7 w-7 shrink-0" aria-hidden>
        <rect width="32" height="32" rx="7" fill={inverted ? "#ffffff" : "#1c2430"} />
        <path d="M6 8 L16 17 L26 8" stroke="#b9512a" strokeWidth="3" fill="none" strokeLinecap="round" />
        <path
          d="M6 24 L16 17 L26 24"
          stroke={inverted ? "#1f6b73" : "#7fc4c9"}
          strokeWidth="3"
          fill="none"
          strokeLinecap="round"
        />
      </svg>
      {compact ? null : (
        <span className={`text-lg font-semibold tracking-tight ${inverted ? "text-white" : "text-ink"}`}>
          Bandcross
        </span>
      )}
    </span>
  );
}
