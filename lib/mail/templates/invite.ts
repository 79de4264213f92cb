import { button, esc, frame } from "./layout";

export function inviteMail(input: { labName: string; inviterName: string; role: string; link: string; expiresDays: number }) {
  const subject = `${input.inviterName} invited you to ${input.labName} on Bandcross`;
  const html = frame(
    `Join ${input.labName}`,
    `<p>${esc(input.inviterName)} invited you to join <strong>${esc(input.labName)}</strong> as <strong>${esc(input.role)}</strong>.</p>
<p>Bandcross keeps the lab's tunnelling spectra, band-gap picks and phase plots in one place.</p>
${button(input.link, "Accept and set your password")}
<p style="font-size:13px;color:#6b6557">The link works once and expires in ${input.expiresDays} days. If you did not expect this, ignore this message.</p>`,
  );
  const text = `${input.inviterName} invited you to join ${input.labName} on Bandcross as ${input.role}.

Accept and set your password: ${input.link}

The link works once and expires in ${input.expiresDays} days. If you did not expect this, ignore this message.`;
  return { subject, html, text };
}
