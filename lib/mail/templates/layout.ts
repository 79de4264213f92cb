/** Minimal escaping for text placed into the HTML bodies. */
export function esc(value: string): string {
  return value.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/** The shared frame of every Bandcross e-mail: plain, readable, no remote images. */
export function frame(title: string, bodyHtml: string, footerHtml = ""): string {
  return `<!doctype html><html><body style="margin:0;background:#f4f1ea;font-family:Helvetica,Arial,sans-serif;color:#1c2430">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0"><tr><td align="center" style="padding:32px 12px">
<table role="presentation" width="560" cellpadding="0" cellspacing="0" style="max-width:560px;background:#ffffff;border:1px solid #ddd6c8;border-radius:10px">
<tr><td style="padding:20px 28px;border-bottom:3px solid #c2562b;font-weight:700;letter-spacing:.04em">BANDCROSS</td></tr>
<tr><td style="padding:24px 28px"><h1 style="font-size:20px;margin:0 0 16px">${esc(title)}</h1>${bodyHtml}</td></tr>
<tr><td style="padding:16px 28px;font-size:12px;color:#6b6557;border-top:1px solid #eee6d6">${footerHtml || "Sent by Bandcross, your lab's spectroscopy notebook."}</td></tr>
</table></td></tr></table></body></html>`;
}

export function button(href: string, label: string): string {
  return `<p style="margin:24px 0"><a href="${esc(href)}" style="background:#1c2430;color:#ffffff;text-decoration:none;padding:12px 18px;border-radius:6px;display:inline-block">${esc(label)}</a></p>`;
}
