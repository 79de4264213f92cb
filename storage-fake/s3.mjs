// Local S3-compatible object storage for development and tests (s3rver).
//
// Run with:  node --openssl-legacy-provider storage-fake/s3.mjs --port 9010 --dir .data/s3 --bucket bandcross-raw
// (or S3_FAKE_PORT / S3_FAKE_HOST / S3_FAKE_DIR / S3_BUCKET). The legacy provider is needed by
// s3rver's ListObjectsV2 continuation tokens on Node 20.
//
// The bucket is created on start (kept when it already exists) with a CORS rule that lets a browser
// PUT/GET/HEAD from any origin and read the ETag, so presigned uploads work from the app's pages.
// s3rver does not check signatures: access control belongs to the app, which decides who gets a URL.

import fs from "node:fs";
import path from "node:path";
import { createRequire } from "node:module";
import { pathToFileURL } from "node:url";

const require = createRequire(import.meta.url);
const S3rver = require("s3rver");

export const CORS_XML = `<CORSConfiguration>
  <CORSRule>
    <AllowedOrigin>*</AllowedOrigin>
    <AllowedMethod>PUT</AllowedMethod>
    <AllowedMethod>GET</AllowedMethod>
    <AllowedMethod>HEAD</AllowedMethod>
    <AllowedHeader>*</AllowedHeader>
    <ExposeHeader>ETag</ExposeHeader>
    <ExposeHeader>Content-Length</ExposeHeader>
    <ExposeHeader>Content-Type</ExposeHeader>
    <MaxAgeSeconds>3000</MaxAgeSeconds>
  </CORSRule>
</CORSConfiguration>`;

/** Start the storage fake. Resolves to { port, url, close() }. port 0 picks a free port. */
export async function startStorageFake({
  port = 9010,
  host = "127.0.0.1",
  directory,
  buckets = ["bandcross-raw"],
  quiet = true,
} = {}) {
  if (!directory) throw new Error("directory is required");
  fs.mkdirSync(directory, { recursive: true });
  const server = new S3rver({
    address: host,
    port,
    directory,
    silent: quiet,
    resetOnClose: false,
    // Path-style only (the app sets forcePathStyle), so "127.0.0.1:9010/<bucket>/<key>".
    vhostBuckets: false,
    configureBuckets: buckets.map((name) => ({ name, configs: [CORS_XML] })),
  });
  const address = await server.run();
  return {
    port: address.port,
    url: `http://${host}:${address.port}`,
    close: () => server.close(),
  };
}

function argValue(name) {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

const isMain = process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href;
if (isMain) {
  const port = Number(argValue("port") ?? process.env.S3_FAKE_PORT ?? 9010);
  const host = argValue("host") ?? process.env.S3_FAKE_HOST ?? "127.0.0.1";
  const directory = path.resolve(argValue("dir") ?? process.env.S3_FAKE_DIR ?? ".data/s3");
  const bucket = argValue("bucket") ?? process.env.S3_BUCKET ?? "bandcross-raw";
  const fake = await startStorageFake({ port, host, directory, buckets: [bucket], quiet: !process.env.S3_FAKE_VERBOSE });
  console.log(`storage fake listening on ${fake.url}, bucket ${bucket}, data ${directory}`);
  const stop = () => fake.close().finally(() => process.exit(0));
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  const parent = process.ppid;
  setInterval(() => {
    if (process.ppid !== parent) stop();
  }, 2000).unref();
}
