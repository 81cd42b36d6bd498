// SVG to PNG with resvg (a well-kept renderer; drawing text and anti-aliased shapes by hand is what
// the project stopped doing), with the font shipped in the package (DejaVu Sans, from the
// dejavu-fonts-ttf npm package) so a chart renders the same on every machine: the system's fonts
// are never consulted.

import { createRequire } from 'node:module';
import { Resvg } from '@resvg/resvg-js';

const require = createRequire(import.meta.url);
let fontFile: string | undefined;

function font(): string {
  fontFile ??= require.resolve('dejavu-fonts-ttf/ttf/DejaVuSans.ttf');
  return fontFile;
}

/** Rasterise an SVG document to PNG bytes at its own size (times `scale`), over `background` (null: transparent). */
export function svgToPng(svg: string, scale = 1, background: string | null = '#ffffff'): Buffer {
  const r = new Resvg(svg, {
    font: { fontFiles: [font()], loadSystemFonts: false, defaultFontFamily: 'DejaVu Sans' },
    fitTo: scale === 1 ? { mode: 'original' } : { mode: 'zoom', value: scale },
    ...(background ? { background } : {}),
  });
  return r.render().asPng();
}

/** The bytes of a chart for a file: SVG as it is, or PNG, by the file's extension. */
export function chartBytes(svg: string, file: string): Buffer {
  return file.toLowerCase().endsWith('.svg') ? Buffer.from(svg) : svgToPng(svg);
}
