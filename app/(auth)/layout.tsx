import { BrandMark } from "@/components/brand";

export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <div className="grid min-h-screen lg:grid-cols-[1.1fr_1fr]">
      <aside className="relative hidden overflow-hidden bg-night text-white lg:block">
        <div className="absolute inset-0 opacity-90" aria-hidden>
          <BandArt />
        </div>
        <div className="relative flex h-full flex-col justify-between p-12">
          <BrandMark inverted />
          <div className="max-w-md">
            <p className="text-3xl font-semibold leading-tight">
              Every gap, every field, traceable to the file that made it.
            </p>
            <p className="mt-4 text-sm text-white/70">
              Upload a session's spectra, review the band edges, and watch the gap close and reopen as the tip
              approaches — with the critical field, its interval and the model behind it.
            </p>
          </div>
          <p className="text-xs text-white/50">Bandcross · lab notebook for tunnelling spectroscopy</p>
        </div>
      </aside>
      <main className="flex items-center justify-center px-6 py-12">{children}</main>
    </div>
  );
}

/** Decorative: the gap of a field-tuned film closing and reopening, drawn as two bands meeting. */
function BandArt() {
  const lines = Array.from({ length: 14 }, (_, i) => i);
  return (
    <svg viewBox="0 0 600 800" className="h-full w-full" preserveAspectRatio="xMidYMid slice">
      <defs>
        <linearGradient id="g" x1="0" x2="0" y1="0" y2="1">
          <stop offset="0" stopColor="#b9512a" stopOpacity="0.9" />
          <stop offset="1" stopColor="#7fc4c9" stopOpacity="0.9" />
        </linearGradient>
      </defs>
      {lines.map((i) => {
        const y = 120 + i * 40;
        const d = 160 - Math.abs(i - 6.5) * 22;
        return (
          <path
            key={i}
            d={`M -20 ${y - d} Q 300 ${y + (i < 7 ? 1 : -1) * 10} 620 ${y - d}`}
            stroke="url(#g)"
            strokeOpacity={0.15 + (i % 3) * 0.1}
            strokeWidth="1.5"
            fill="none"
          />
        );
      })}
      <path d="M 60 180 L 300 420 L 540 180" stroke="#b9512a" strokeWidth="3" fill="none" />
      <path d="M 60 660 L 300 420 L 540 660" stroke="#7fc4c9" strokeWidth="3" fill="none" />
      <circle cx="300" cy="420" r="7" fill="#fff" />
    </svg>
  );
}
