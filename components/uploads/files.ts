/** Browser-side helpers for the upload panel: walking dropped folders and hashing files. */

const SPECTRUM_FILE = /\.(csv|tsv|txt|dat|json|zip)$/i;

/** Every file in a drop, folders walked recursively (hidden files and non-spectrum files skipped). */
export async function filesFromDrop(dt: DataTransfer): Promise<{ files: File[]; skipped: string[] }> {
  const files: File[] = [];
  const skipped: string[] = [];
  const entries = [...dt.items].map((i) => i.webkitGetAsEntry?.()).filter((e): e is FileSystemEntry => Boolean(e));
  if (entries.length === 0) return splitFiles([...dt.files]);
  const visit = async (entry: FileSystemEntry, prefix: string): Promise<void> => {
    if (entry.name.startsWith(".")) return;
    if (entry.isFile) {
      const file = await new Promise<File>((resolve, reject) => (entry as FileSystemFileEntry).file(resolve, reject));
      const named = prefix
        ? new File([file], `${prefix}_${file.name}`, { type: file.type, lastModified: file.lastModified })
        : file;
      if (SPECTRUM_FILE.test(file.name)) files.push(named);
      else skipped.push(named.name);
    } else if (entry.isDirectory) {
      const reader = (entry as FileSystemDirectoryEntry).createReader();
      for (;;) {
        const batch = await new Promise<FileSystemEntry[]>((resolve, reject) => reader.readEntries(resolve, reject));
        if (batch.length === 0) break;
        for (const e of batch) await visit(e, prefix ? `${prefix}_${entry.name}` : entry.name);
      }
    }
  };
  for (const e of entries) await visit(e, "");
  return { files, skipped };
}

export function splitFiles(list: File[]): { files: File[]; skipped: string[] } {
  const files = list.filter((f) => SPECTRUM_FILE.test(f.name) && !f.name.startsWith("."));
  return { files, skipped: list.filter((f) => !files.includes(f)).map((f) => f.name) };
}

export async function sha256Hex(file: File): Promise<string> {
  const digest = await crypto.subtle.digest("SHA-256", await file.arrayBuffer());
  return [...new Uint8Array(digest)].map((b) => b.toString(16).padStart(2, "0")).join("");
}

/** PUT with progress (fetch cannot report upload progress). */
/** What a refused upload link most likely means, said to the user. */
const EXPIRED = " (the upload link may have expired; try again)";

export function putWithProgress(
  url: string,
  file: File,
  headers: Record<string, string>,
  onProgress: (fraction: number) => void,
): Promise<void> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("PUT", url);
    for (const [k, v] of Object.entries(headers)) xhr.setRequestHeader(k, v);
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onload = () =>
      xhr.status >= 200 && xhr.status < 300
        ? resolve()
        : reject(new Error(`storage answered ${xhr.status}${xhr.status === 403 ? EXPIRED : ""}`));
    xhr.onerror = () => reject(new Error("the connection to storage failed"));
    xhr.send(file);
  });
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 ** 2) return `${(n / 1024).toFixed(1)} kB`;
  return `${(n / 1024 ** 2).toFixed(1)} MB`;
}
