/** The report's pictures drawn from SVG to PNG with the browser's own renderer (an <img> and a canvas). */
import type { Report } from '../../src/report/index.js';

export async function svgToPng(svg: string, widthPx: number, heightPx: number): Promise<Uint8Array> {
  const url = URL.createObjectURL(new Blob([svg], { type: 'image/svg+xml' }));
  try {
    const img = new Image();
    img.src = url;
    await img.decode();
    const canvas = document.createElement('canvas');
    canvas.width = Math.max(1, Math.round(widthPx));
    canvas.height = Math.max(1, Math.round(heightPx));
    const g = canvas.getContext('2d');
    if (!g) throw new Error('This browser cannot draw pictures (no 2-D canvas).');
    g.fillStyle = '#ffffff';
    g.fillRect(0, 0, canvas.width, canvas.height);
    g.drawImage(img, 0, 0, canvas.width, canvas.height);
    const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, 'image/png'));
    if (!blob) throw new Error('The picture could not be turned into PNG.');
    return new Uint8Array(await blob.arrayBuffer());
  } finally {
    URL.revokeObjectURL(url);
  }
}

/** Fills in the PNG of every picture that has only its SVG. */
export async function drawReportPictures(report: Report): Promise<void> {
  for (const sheet of report.sheets) {
    for (const im of sheet.images ?? []) {
      if (im.png.length === 0) im.png = await svgToPng(im.svg, im.widthPx, im.heightPx);
    }
  }
}
