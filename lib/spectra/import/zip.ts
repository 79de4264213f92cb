/**
 * Zip archives, read in memory with fflate (nothing is written to disk). Before anything is expanded the
 * central directory is checked: number of entries, total expanded size, each entry's size and
 * expanded/compressed ratio (a zip bomb fails the whole archive). Entry names are sanitised: absolute
 * paths, drive letters, backslash paths and `..` segments are refused; directories, `__MACOSX/` and
 * dot-files are skipped. An expanded entry is never larger than its declared size (fflate fills a
 * buffer of exactly that size).
 */
import { unzipSync } from "fflate";
import type { ImportLimits } from "./types";

export interface ZipEntryInfo {
  name: string;
  size: number;
  originalSize: number;
  compression: number;
}

export type ZipListing =
  | { ok: true; entries: ZipEntryInfo[] }
  | { ok: false; message: string };

export function isZip(bytes: Uint8Array): boolean {
  return bytes.length >= 4 && bytes[0] === 0x50 && bytes[1] === 0x4b && (bytes[2] === 3 || bytes[2] === 5) && (bytes[3] === 4 || bytes[3] === 6);
}

export function listZip(bytes: Uint8Array, limits: ImportLimits): ZipListing {
  const entries: ZipEntryInfo[] = [];
  try {
    unzipSync(bytes, {
      filter(f) {
        entries.push({ name: f.name, size: f.size, originalSize: f.originalSize, compression: f.compression });
        if (entries.length > limits.maxZipEntries) throw new RangeError("too many");
        return false;
      },
    });
  } catch (e) {
    if (e instanceof RangeError && e.message === "too many")
      return { ok: false, message: `archive has more than ${limits.maxZipEntries} entries (limit)` };
    return { ok: false, message: `not a readable zip archive (${(e as Error).message})` };
  }
  let total = 0;
  for (const e of entries) {
    total += e.originalSize;
    if (e.originalSize > 65536 && e.size > 0 && e.originalSize / e.size > limits.maxZipRatio)
      return { ok: false, message: `entry "${e.name}" expands ${Math.round(e.originalSize / e.size)}-fold (limit ${limits.maxZipRatio}): refused as a possible zip bomb` };
    if (e.originalSize > 65536 && e.size === 0)
      return { ok: false, message: `entry "${e.name}" declares ${e.originalSize} bytes from no data: refused as a possible zip bomb` };
  }
  if (total > limits.maxZipExpandedBytes)
    return { ok: false, message: `archive expands to ${total} bytes, over the limit of ${limits.maxZipExpandedBytes}` };
  return { ok: true, entries };
}

/** Why an entry name is refused, or null if it is safe. */
export function unsafeEntryName(name: string): string | null {
  if (name.includes("\0")) return "name contains a zero byte";
  if (name.startsWith("/") || name.startsWith("\\")) return "absolute path";
  if (/^[A-Za-z]:/.test(name)) return "absolute path with a drive letter";
  if (name.includes("\\")) return "backslash in the path";
  if (name.split("/").some((seg) => seg === "..")) return "path leads outside the archive (..)";
  return null;
}

export function skipEntry(name: string): boolean {
  if (name.endsWith("/")) return true;
  if (name.startsWith("__MACOSX/")) return true;
  const base = name.split("/").pop() ?? "";
  return base.startsWith(".");
}

/** Expand the named entries (already vetted by listZip). */
export function expandZip(bytes: Uint8Array, names: Set<string>): Record<string, Uint8Array> {
  return unzipSync(bytes, { filter: (f) => names.has(f.name) });
}

/**
 * Read every entry of an archive with `one` (each entry's file name is "archive.zip/entry"), after
 * the checks of listZip and unsafeEntryName; `fail` makes the entry for a refused entry, or the one
 * entry for a whole archive that cannot be read.
 */
export function readArchive<T>(
  name: string,
  bytes: Uint8Array,
  limits: ImportLimits,
  one: (file: string, data: Uint8Array) => T,
  fail: (file: string, message: string) => T,
): T[] {
  if (bytes.length > limits.maxFileBytes) return [fail(name, `archive is ${bytes.length} bytes, over the limit of ${limits.maxFileBytes}`)];
  if (!isZip(bytes)) return [fail(name, "named .zip but not a zip archive")];
  const listing = listZip(bytes, limits);
  if (!listing.ok) return [fail(name, listing.message)];
  const plan: ({ entry: string } | { refused: T })[] = [];
  const wanted = new Set<string>();
  for (const e of listing.entries) {
    if (skipEntry(e.name)) continue;
    const entryFile = `${name}/${e.name}`;
    const bad = unsafeEntryName(e.name);
    if (bad) plan.push({ refused: fail(entryFile, `entry refused: ${bad}`) });
    else if (/\.zip$/i.test(e.name)) plan.push({ refused: fail(entryFile, "nested archives are not read") });
    else if (e.originalSize > limits.maxFileBytes)
      plan.push({ refused: fail(entryFile, `entry expands to ${e.originalSize} bytes, over the limit of ${limits.maxFileBytes}`) });
    else if (e.compression !== 0 && e.compression !== 8)
      plan.push({ refused: fail(entryFile, `entry uses an unsupported compression method (${e.compression})`) });
    else {
      wanted.add(e.name);
      plan.push({ entry: e.name });
    }
  }
  if (plan.length === 0) return [fail(name, "archive holds no files")];
  let files: Record<string, Uint8Array>;
  try {
    files = wanted.size ? expandZip(bytes, wanted) : {};
  } catch (e) {
    return [fail(name, `could not expand the archive (${(e as Error).message})`)];
  }
  return plan.map((p) => {
    if ("refused" in p) return p.refused;
    const data = files[p.entry];
    return data ? one(`${name}/${p.entry}`, data) : fail(`${name}/${p.entry}`, "entry could not be expanded");
  });
}
