import { formatUtc } from "@/lib/format";
import { button, esc, frame } from "./layout";

export type CrossingEventKindText = "found" | "moved" | "confirmed";

/** What one crossing e-mail says; every number in V/nm (field) or eV per V/nm (slopes). */
export interface CrossingMailInput {
  kind: CrossingEventKindText;
  sampleName: string;
  labName: string;
  field_V_per_nm: number;
  ci95_V_per_nm: [number, number] | null;
  /** For "moved": where the earlier event put it. */
  previous?: { field_V_per_nm: number; ci95_V_per_nm: [number, number] | null } | null;
  state: string;
  status: string;
  slopes: { below: number | null; above: number | null };
  nSpectra: number;
  settingsVersion: number | null;
  fieldModelVersion: number | null;
  /** One line: how the field was estimated (work functions, contact distance, barrier, screening). */
  assumptions: string;
  /** Who confirmed it, for "confirmed". */
  confirmedBy?: string | null;
  sampleUrl: string;
  unsubscribeUrl: string;
  /** ISO time of the event. */
  at: string;
}

/**
 * Decimals for a field so that its 95% interval shows at least two significant digits of width,
 * between 2 and 4 decimals (0.98 [0.95, 1.01]; a ±0.004 interval gets three).
 */
export function fieldDecimals(ci: [number, number] | null): number {
  if (!ci) return 2;
  const width = Math.abs(ci[1] - ci[0]);
  if (!(width > 0) || !Number.isFinite(width)) return 2;
  return Math.min(4, Math.max(2, Math.ceil(-Math.log10(width))));
}

export function fieldWithInterval(field: number, ci: [number, number] | null): string {
  const d = fieldDecimals(ci);
  return `${field.toFixed(d)} V/nm${ci ? ` [${ci[0].toFixed(d)}, ${ci[1].toFixed(d)}]` : ""}`;
}

/** The one-line headline of an event: the e-mail subject and the in-app notification's title. */
export function crossingHeadline(input: Pick<CrossingMailInput, "kind" | "sampleName" | "field_V_per_nm" | "ci95_V_per_nm">): string {
  const value = fieldWithInterval(input.field_V_per_nm, input.ci95_V_per_nm);
  const verb = { found: "gap closes at", moved: "critical field moved to", confirmed: "critical field confirmed at" }[input.kind];
  return `${input.sampleName}: ${verb} ${value}`;
}

const slope = (v: number | null) => (v == null || !Number.isFinite(v) ? "—" : `${v >= 0 ? "+" : "−"}${Math.abs(v).toFixed(3)} eV per V/nm`);

function lead(input: CrossingMailInput): string {
  if (input.kind === "found") return `The fit of ${input.sampleName} now shows the gap closing and reopening.`;
  if (input.kind === "moved") {
    const p = input.previous;
    return `A new fit of ${input.sampleName} puts the critical field outside the earlier 95% interval${p ? ` (it was ${fieldWithInterval(p.field_V_per_nm, p.ci95_V_per_nm)})` : ""}.`;
  }
  return `${input.confirmedBy ?? "An analyst"} confirmed the critical field of ${input.sampleName}.`;
}

/** The crossing e-mail: subject, HTML (the shared frame) and plain text with the same content. */
export function crossingMail(input: CrossingMailInput) {
  const subject = crossingHeadline(input);
  const rows: [string, string][] = [
    ["State", `${input.state}${input.status === "confirmed" ? " · confirmed" : " · candidate"}`],
    ["Critical field", fieldWithInterval(input.field_V_per_nm, input.ci95_V_per_nm) + (input.ci95_V_per_nm ? " (95% interval)" : "")],
    ["Slope below", slope(input.slopes.below)],
    ["Slope above", slope(input.slopes.above)],
    ["Spectra in the fit", String(input.nSpectra)],
    ["Versions", `extraction settings v${input.settingsVersion ?? "?"}, field model v${input.fieldModelVersion ?? "?"}`],
  ];
  const table = `<table role="presentation" cellpadding="0" cellspacing="0" style="width:100%;border-collapse:collapse;font-size:14px;margin:8px 0 4px">
${rows.map(([k, v]) => `<tr><td style="padding:6px 12px 6px 0;color:#6b6557;white-space:nowrap;border-bottom:1px solid #eee6d6">${esc(k)}</td><td style="padding:6px 0;font-family:Menlo,Consolas,monospace;border-bottom:1px solid #eee6d6">${esc(v)}</td></tr>`).join("\n")}
</table>`;
  const html = frame(
    subject,
    `<p>${esc(lead(input))}</p>
${table}
<p style="font-size:13px;color:#6b6557;margin-top:14px"><strong>The field is an estimate, not a measurement:</strong> ${esc(input.assumptions)}</p>
${button(input.sampleUrl, "Open the phase plot")}
<p style="font-size:13px;color:#6b6557">Lab: ${esc(input.labName)} · ${esc(formatUtc(input.at))}</p>`,
    `You get this because you watch ${esc(input.sampleName)} in Bandcross. <a href="${esc(input.unsubscribeUrl)}" style="color:#6b6557">Stop e-mails about this sample</a>.`,
  );
  const text = `${subject}

${lead(input)}

${rows.map(([k, v]) => `${`${k}:`.padEnd(20)}${v}`).join("\n")}

The field is an estimate, not a measurement: ${input.assumptions}

Open the phase plot: ${input.sampleUrl}

Lab: ${input.labName} · ${formatUtc(input.at)}
You get this because you watch ${input.sampleName} in Bandcross.
Stop e-mails about this sample: ${input.unsubscribeUrl}
`;
  return { subject, html, text };
}
