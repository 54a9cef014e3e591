import { surfaceFigureSvg, type FigureSpec } from './surfaceFigure.ts';
import { svgToPng } from './svgToPng.ts';

/**
 * The figure as PNG: the SVG of `surfaceFigureSvg` (surfaces as an image at
 * the figure's pixel size), rendered with the figure font, so PNG and SVG show
 * the same drawing. Node only (the renderer is native).
 */
export function surfaceFigurePng(spec: FigureSpec): Uint8Array {
  return svgToPng(surfaceFigureSvg({ ...spec, surface: 'image' }), spec.width, spec.dpi ?? 150);
}
