import Link from "next/link";
import { spectrumIndex } from "@/lib/format";
import type { SpectrumData } from "./review-figure";

/**
 * Where this number comes from: the file and its hash, setpoint, temperature and lock-in,
 * distance, field, region, tip, versions.
 */
/** A measured setting as people read it: three significant digits (a file may carry many more). */
const sig3 = (v: number) => Number(v.toPrecision(3));

export function SpectrumProvenance({ lab, data }: { lab: string; data: SpectrumData }) {
  const m = data.metadata;
  const setpoint =
    m.setpointBias_V != null && m.setpointCurrent_A != null
      ? `${sig3(m.setpointBias_V)} V, ${(m.setpointCurrent_A * 1e12).toPrecision(4)} pA`
      : "not recorded";
  const distance =
    data.distance_nm != null ? `${data.distance_nm.toFixed(3)} ± ${(data.distanceSigma_nm ?? 0).toFixed(3)} nm` : "—";
  const field =
    data.field_V_per_nm != null
      ? `${data.field_V_per_nm.toFixed(3)} ± ${(data.fieldSigma_V_per_nm ?? 0).toFixed(3)} V/nm`
      : "—";
  return (
    <section className="rounded-xl border border-line bg-card p-4 text-sm" aria-label="Spectrum">
      <h2 className="text-sm font-semibold">Where this number comes from</h2>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-xs">
        <dt className="text-muted">file</dt>
        <dd className="break-all">
          {data.sourceName} {spectrumIndex(data.index)}
        </dd>
        <dt className="text-muted">SHA-256</dt>
        <dd className="num break-all" title={data.upload.sha256}>
          {data.upload.sha256.slice(0, 16)}…
        </dd>
        <dt className="text-muted">setpoint</dt>
        <dd className="num">{setpoint}</dd>
        <dt className="text-muted">T, lock-in</dt>
        <dd className="num">
          {sig3(data.analysis.temperature_K)} K, {sig3(data.analysis.lockinModulation_mV_rms)} mV rms
        </dd>
        <dt className="text-muted">distance</dt>
        <dd className="num">{distance}</dd>
        <dt className="text-muted">field (estimate)</dt>
        <dd className="num">{field}</dd>
        <dt className="text-muted">region, tip</dt>
        <dd>
          {m.region ?? "—"}, {m.tipLabel ?? "—"}
        </dd>
        <dt className="text-muted">versions</dt>
        <dd className="num">
          settings v{data.versions.extractionSettings?.version ?? "?"}, field model v
          {data.versions.fieldModel?.version ?? "?"}
        </dd>
      </dl>
      {data.warnings.length ? (
        <ul className="mt-2 list-disc pl-4 text-xs text-copper">
          {data.warnings.map((w, i) => (
            <li key={i}>{w}</li>
          ))}
        </ul>
      ) : null}
      <p className="mt-3 text-xs">
        <Link className="underline" href={`/labs/${lab}/samples/${data.sampleId}`}>
          Back to {data.sampleName}
        </Link>
      </p>
    </section>
  );
}
