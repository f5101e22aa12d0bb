/**
 * The export of the plot as a message to the host: the publication SVG (exportPlot.ts) as text, or that SVG
 * rasterised to PNG at 600 dpi in the page (an image and a canvas; no network, a data: URL).
 */
import { ViewToHostType, type ExportFormat, type ExportMessage } from '../../src/protocol';
import { buildExportSvg, pngSize, type ExportInput } from './exportPlot';

/** The export message for the plot as `input` describes it (PNG: rasterised here; may throw). */
export async function exportMessage(input: ExportInput, format: ExportFormat): Promise<ExportMessage> {
  const { svg, width, height } = buildExportSvg(input);
  if (format === 'svg') return { type: ViewToHostType.Export, format: 'svg', data: svg, width, height };
  const size = pngSize();
  const bytes = await rasterise(svg, size.width, size.height);
  return { type: ViewToHostType.Export, format: 'png', data: bytes, width: size.width, height: size.height };
}

/** SVG text → PNG bytes through an image and a canvas, on a white background. */
export async function rasterise(svg: string, width: number, height: number): Promise<Uint8Array> {
  const img = new Image(width, height);
  const url = `data:image/svg+xml;base64,${btoa(unescape(encodeURIComponent(svg)))}`;
  await new Promise<void>((resolve, reject) => {
    img.addEventListener('load', () => resolve());
    img.addEventListener('error', () => reject(new Error('the SVG did not load as an image')));
    img.src = url;
  });
  const canvas = document.createElement('canvas');
  canvas.width = width;
  canvas.height = height;
  const ctx = canvas.getContext('2d');
  if (!ctx) throw new Error('no 2D canvas');
  ctx.fillStyle = '#ffffff';
  ctx.fillRect(0, 0, width, height);
  ctx.drawImage(img, 0, 0, width, height);
  const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/png'));
  if (!blob) throw new Error('the canvas gave no PNG');
  return new Uint8Array(await blob.arrayBuffer());
}
