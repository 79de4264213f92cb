/**
 * Bytes → text. UTF-8 (with or without BOM), UTF-16 LE/BE (with BOM, or without one when the pattern of
 * zero bytes says so), Windows-1252 as the fallback for 8-bit files that are not valid UTF-8. Files with
 * zero bytes or many control characters are rejected as binary.
 */
import { ImportError } from "./types";

export interface Decoded {
  text: string;
  encoding: "utf-8" | "utf-16le" | "utf-16be" | "windows-1252";
  bom: boolean;
}

function looksBinary(text: string): boolean {
  const n = Math.min(text.length, 8192);
  let bad = 0;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if ((c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12) || c === 0xfffd) bad++;
  }
  return bad > Math.max(2, n * 0.01);
}

export function decodeText(bytes: Uint8Array): Decoded {
  if (bytes.length === 0) throw new ImportError("empty file");
  let encoding: Decoded["encoding"] = "utf-8";
  let bom = false;
  let start = 0;
  if (bytes.length >= 3 && bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
    bom = true;
    start = 3;
  } else if (bytes.length >= 2 && bytes[0] === 0xff && bytes[1] === 0xfe) {
    encoding = "utf-16le";
    bom = true;
    start = 2;
  } else if (bytes.length >= 2 && bytes[0] === 0xfe && bytes[1] === 0xff) {
    encoding = "utf-16be";
    bom = true;
    start = 2;
  } else {
    const n = Math.min(bytes.length, 4096) & ~1;
    let evenZero = 0;
    let oddZero = 0;
    for (let i = 0; i < n; i += 2) {
      if (bytes[i] === 0) evenZero++;
      if (bytes[i + 1] === 0) oddZero++;
    }
    const half = Math.max(1, n / 2);
    if (oddZero > 0.3 * half && evenZero < 0.05 * half) encoding = "utf-16le";
    else if (evenZero > 0.3 * half && oddZero < 0.05 * half) encoding = "utf-16be";
    else if (evenZero + oddZero > 0) throw new ImportError("binary file (contains zero bytes); expected text, JSON or zip");
  }
  const body = bytes.subarray(start);
  let text: string;
  if (encoding === "utf-8") {
    try {
      text = new TextDecoder("utf-8", { fatal: true }).decode(body);
    } catch {
      text = new TextDecoder("windows-1252").decode(body);
      encoding = "windows-1252";
    }
  } else {
    text = new TextDecoder(encoding).decode(body);
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (looksBinary(text)) throw new ImportError("binary file (control characters in the text); expected text, JSON or zip");
  if (text.trim() === "") throw new ImportError("empty file (no text)");
  return { text, encoding, bom };
}
