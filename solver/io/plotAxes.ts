import { niceTicks, tickLabel } from './surfaceView.ts';
import { FIGURE_FONT_FAMILY, FIGURE_TYPE, svgText, textWidthEm, typeset } from './figureType.ts';

export interface PlotAxis {
  min: number;
  max: number;
  /** label with markup: `k^{2}`, `D_{u}` */
  label: string;
}

export interface PlotSpec {
  width: number;
  height: number;
  dpi: number;
  x: PlotAxis;
  y: PlotAxis;
  title?: string;
}

/** A plot's frame: data → pixel maps, the plotting box, and the SVG of its axes (drawn last, over the data). */
export interface PlotFrame {
  X(v: number): number;
  Y(v: number): number;
  box: { left: number; top: number; width: number; height: number };
  /** pixels per point */
  pt: number;
  open(): string[];
  axes(): string[];
}

/** A tick's number as type sets it. */
export const typesetNumber = (v: number) => typeset(tickLabel(v));

/**
 * The frame of a line plot in the figures' type (sizes in points, `dpi` sets
 * pixels): a box with round ticks and labels on both axes, axis titles, an
 * optional title. Data inside is the caller's; `axes()` goes over it.
 */
export function plotFrame(spec: PlotSpec): PlotFrame {
  const pt = spec.dpi / 72;
  const T = FIGURE_TYPE;
  const xTicks = niceTicks(spec.x.min, spec.x.max, 6), yTicks = niceTicks(spec.y.min, spec.y.max, 6);
  const yLabelWidth = Math.max(...yTicks.map((v) => textWidthEm(typesetNumber(v)))) * T.tick * pt;
  const left = T.margin * pt + T.axis * 1.6 * pt + yLabelWidth + T.tickGap * pt + T.tickLength * pt;
  const top = T.margin * pt + (spec.title ? T.title * 1.7 * pt : T.tick * pt);
  const bottom = T.margin * pt + T.axis * 1.6 * pt + T.tick * 1.3 * pt + T.tickLength * pt + T.tickGap * pt;
  const right = T.margin * pt + T.tick * 2 * pt;
  const box = { left, top, width: Math.max(10, spec.width - left - right), height: Math.max(10, spec.height - top - bottom) };
  const X = (v: number) => box.left + ((v - spec.x.min) / (spec.x.max - spec.x.min)) * box.width;
  const Y = (v: number) => box.top + box.height - ((v - spec.y.min) / (spec.y.max - spec.y.min)) * box.height;
  const stroke = (0.6 * pt).toFixed(2);
  return {
    X, Y, box, pt,
    open: () => [
      `<svg xmlns="http://www.w3.org/2000/svg" width="${((spec.width * 72) / spec.dpi).toFixed(2)}pt" height="${((spec.height * 72) / spec.dpi).toFixed(2)}pt" viewBox="0 0 ${spec.width} ${spec.height}" font-family="${FIGURE_FONT_FAMILY}">`,
      `<rect width="${spec.width}" height="${spec.height}" fill="white"/>`,
      `<clipPath id="plot"><rect x="${box.left.toFixed(2)}" y="${box.top.toFixed(2)}" width="${box.width.toFixed(2)}" height="${box.height.toFixed(2)}"/></clipPath>`,
    ],
    axes: () => {
      const out = [`<g class="axes">`, `<rect x="${box.left.toFixed(2)}" y="${box.top.toFixed(2)}" width="${box.width.toFixed(2)}" height="${box.height.toFixed(2)}" fill="none" stroke="black" stroke-width="${stroke}"/>`];
      const yBase = box.top + box.height;
      for (const v of xTicks) {
        const x = X(v);
        out.push(`<line x1="${x.toFixed(2)}" y1="${yBase.toFixed(2)}" x2="${x.toFixed(2)}" y2="${(yBase + T.tickLength * pt).toFixed(2)}" stroke="black" stroke-width="${stroke}"/>`);
        out.push(svgText(typesetNumber(v), x, yBase + (T.tickLength + T.tickGap) * pt + T.tick * pt, T.tick * pt, { anchor: 'middle', cls: 'xtick' }));
      }
      for (const v of yTicks) {
        const y = Y(v);
        out.push(`<line x1="${(box.left - T.tickLength * pt).toFixed(2)}" y1="${y.toFixed(2)}" x2="${box.left.toFixed(2)}" y2="${y.toFixed(2)}" stroke="black" stroke-width="${stroke}"/>`);
        out.push(svgText(typesetNumber(v), box.left - (T.tickLength + T.tickGap) * pt, y + 0.36 * T.tick * pt, T.tick * pt, { anchor: 'end', cls: 'ytick' }));
      }
      out.push(svgText(spec.x.label, box.left + box.width / 2, spec.height - T.margin * pt, T.axis * pt, { anchor: 'middle', cls: 'xlabel', markup: true }));
      const yx = T.margin * pt + T.axis * pt;
      out.push(svgText(spec.y.label, yx, box.top + box.height / 2, T.axis * pt, { anchor: 'middle', cls: 'ylabel', markup: true, rotate: -90 }));
      if (spec.title) out.push(svgText(spec.title, spec.width / 2, T.margin * pt + T.title * pt, T.title * pt, { anchor: 'middle', cls: 'title' }));
      out.push('</g>');
      return out;
    },
  };
}

/** A polyline through data points (clipped to the plot box). */
export function polyline(frame: PlotFrame, xs: readonly number[], ys: readonly number[], o: { stroke: string; width: number; cls?: string; dash?: string }): string {
  const pts = xs.map((x, i) => `${frame.X(x).toFixed(2)},${frame.Y(ys[i]).toFixed(2)}`).join(' ');
  return `<polyline${o.cls ? ` class="${o.cls}"` : ''} clip-path="url(#plot)" points="${pts}" fill="none" stroke="${o.stroke}" stroke-width="${(o.width * frame.pt).toFixed(2)}"${o.dash ? ` stroke-dasharray="${o.dash}"` : ''}/>`;
}
