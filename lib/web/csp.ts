/**
 * The Content-Security-Policy of every page, with a fresh nonce per response (`proxy.ts`; Next
 * puts the nonce on its own inline and bundle scripts when the request carries the policy).
 *
 * - `script-src 'self' 'nonce-…'`: the app's own files (bundles, the plotting library under
 *   /vendor, both same-origin) and inline scripts that carry this response's nonce. No
 *   'unsafe-inline' and no 'unsafe-eval' outside `next dev` (React's dev build needs eval): the
 *   plotting library is built with Plotly's CSP-safe ("strict") WebGL scatter, whose draw code is
 *   generated ahead of time (scripts/plotly-vendor.ts). Not 'strict-dynamic': it would refuse the
 *   library's `<script>` that React's `preinit` writes into the head without a nonce.
 * - `style-src 'self' 'unsafe-inline'`: React `style` props and Plotly set style attributes, which
 *   a nonce cannot cover (common practice; styles cannot run code).
 * - `img-src` data: and blob: for figure files and Plotly's images; `worker-src 'self'` for the
 *   script worker (/sw.js); `connect-src` the app and the raw-file store the browser uploads to.
 * - `frame-ancestors 'none'`, `base-uri 'self'`, `form-action 'self'`, `object-src 'none'`.
 */
export interface CspInput {
  nonce: string;
  /** Origins the browser PUTs raw files to (`uploadOrigins`). */
  connect: string[];
  dev?: boolean;
  /** The app is served over https: ask the browser to upgrade any http address. */
  https?: boolean;
}

export function contentSecurityPolicy({ nonce, connect, dev = false, https = false }: CspInput): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}'${dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' data: blob:",
    "font-src 'self'",
    `connect-src ${["'self'", ...connect].join(" ")}`,
    "worker-src 'self'",
    "frame-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/** Powerful browser features no page of the app uses, switched off for every page and frame. */
export const PERMISSIONS_POLICY = [
  "camera=()",
  "microphone=()",
  "geolocation=()",
  "payment=()",
  "usb=()",
  "serial=()",
  "hid=()",
  "midi=()",
  "display-capture=()",
].join(", ");

/**
 * Where presigned upload addresses point (lib/storage/s3.ts presigns against S3_PUBLIC_ENDPOINT,
 * else S3_ENDPOINT, else AWS): that origin, and the bucket's own host name when the store is
 * addressed virtual-host style (S3_FORCE_PATH_STYLE false).
 */
export function uploadOrigins(e: { S3_PUBLIC_ENDPOINT?: string; S3_ENDPOINT?: string; S3_BUCKET: string; S3_REGION: string; S3_FORCE_PATH_STYLE: boolean }): string[] {
  const endpoint = e.S3_PUBLIC_ENDPOINT ?? e.S3_ENDPOINT ?? `https://s3.${e.S3_REGION}.amazonaws.com`;
  const url = new URL(endpoint);
  const origins = [url.origin];
  if (!e.S3_FORCE_PATH_STYLE) origins.push(`${url.protocol}//${e.S3_BUCKET}.${url.host}`);
  return origins;
}
