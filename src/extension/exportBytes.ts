/** A sanity check of exported plot bytes before they are written (a PNG signature, an SVG root). Pure. */
import type { ExportFormat } from '../protocol';

const PNG_SIGNATURE = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];

/** Null when the bytes look like the format, otherwise the sentence why not. */
export function checkExportBytes(format: ExportFormat, bytes: Uint8Array): string | null {
  if (bytes.length === 0) return 'The band view sent an empty plot.';
  if (format === 'png') {
    for (let i = 0; i < PNG_SIGNATURE.length; i++)
      if (bytes[i] !== PNG_SIGNATURE[i]) return 'The band view sent data that is not a PNG image.';
    return null;
  }
  const head = new TextDecoder('utf-8')
    .decode(bytes.subarray(0, 512))
    .replace(/^\uFEFF/, '')
    .trimStart();
  if (!/^(<\?xml[^>]*>\s*)?(<!--[\s\S]*?-->\s*)*<svg[\s>]/.test(head)) return 'The band view sent text that is not an SVG image.';
  return null;
}
