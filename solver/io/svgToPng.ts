import { createRequire } from 'node:module';
import { Resvg } from '@resvg/resvg-js';
import { withPhys } from './encodePng.ts';

const require = createRequire(import.meta.url);
let fontFiles: string[] | undefined;

/** The figure font's files (DejaVu Sans, from the dejavu-fonts-ttf package). */
function figureFonts(): string[] {
  fontFiles ??= ['DejaVuSans.ttf', 'DejaVuSans-Bold.ttf', 'DejaVuSans-Oblique.ttf'].map((f) => require.resolve(`dejavu-fonts-ttf/ttf/${f}`));
  return fontFiles;
}

/**
 * Render an SVG figure to a PNG `width` pixels wide with resvg (a maintained
 * SVG renderer) and the figure font's own files, never the machine's fonts:
 * the same picture on every machine. The DPI goes into a pHYs chunk.
 */
export function svgToPng(svg: string, width: number, dpi: number): Uint8Array {
  const resvg = new Resvg(svg, {
    font: { fontFiles: figureFonts(), loadSystemFonts: false, defaultFontFamily: 'DejaVu Sans', sansSerifFamily: 'DejaVu Sans' },
    fitTo: { mode: 'width', value: width },
    background: 'white',
  });
  return withPhys(new Uint8Array(resvg.render().asPng()), dpi);
}
