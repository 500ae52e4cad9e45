/**
 * Offering an exported file (CSV, HTML report, PDF) as a download from the window: a Blob of the bytes
 * with the type the service named, an object URL for a link, and one automatic click. Browser-only
 * (DOM); used by the logbook and compare screens.
 */
import type { ExportOutcome } from '../../../shared/contract.ts';

export interface OfferedFile {
  name: string;
  mime: string;
  sizeBytes: number;
  url: string;
}

/** Make the link (the caller revokes `url` when it replaces or drops the link) and start the download once. */
export function offerDownload(out: ExportOutcome, click = true): OfferedFile {
  const bytes = new Uint8Array(out.data.byteLength);
  bytes.set(out.data);
  const blob = new Blob([bytes], { type: out.mime || 'application/octet-stream' });
  const url = URL.createObjectURL(blob);
  if (click) {
    const a = document.createElement('a');
    a.href = url;
    a.download = out.name;
    a.rel = 'noopener';
    a.style.display = 'none';
    document.body.appendChild(a);
    a.click();
    a.remove();
  }
  return { name: out.name, mime: out.mime, sizeBytes: out.data.byteLength, url };
}
