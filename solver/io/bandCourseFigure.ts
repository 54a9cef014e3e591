import { plotFrame, polyline } from './plotAxes.ts';
import { FIGURE_TYPE, svgText, textWidthEm } from './figureType.ts';
import type { BandCourse } from '../analysis/bandThroughGrowth.ts';

/**
 * The band through growth as a figure: time across, k² (or the wavelength
 * 2π/k) up, the unstable band as a shaded strip, each followed eigenvalue
 * cluster as a line (blue while inside the band), its entry marked and
 * labelled with the time.
 */
export function bandCourseFigureSvg(course: BandCourse, o: { y?: 'k2' | 'wavelength'; units?: string; title?: string; width: number; height: number; dpi: number }): string {
  const byWavelength = o.y === 'wavelength';
  const map = (k2: number) => (byWavelength ? (2 * Math.PI) / Math.sqrt(k2) : k2);
  const [a, b] = course.band;
  const all = course.clusters.flatMap((c) => c.eigenvalues);
  const lo = Math.min(a, ...all), hi = Math.max(b, ...all);
  const [yMin, yMax] = byWavelength ? [map(Math.min(hi, 3 * b)), map(Math.max(lo, a / 3))] : [Math.max(0, Math.min(lo, a / 1.5)), Math.min(hi, 1.5 * b)];
  const frame = plotFrame({
    width: o.width, height: o.height, dpi: o.dpi, title: o.title,
    x: { min: 0, max: course.end, label: 'time' },
    y: { min: yMin, max: yMax, label: byWavelength ? `wavelength 2π/k (${o.units ?? 'length'})` : `k^{2} (${o.units ?? 'length'}^{−2})` },
  });
  const { X, Y, box, pt } = frame;
  const T = FIGURE_TYPE;
  const out = frame.open();
  const ya = Y(map(a)), yb = Y(map(b));
  const top = Math.max(box.top, Math.min(ya, yb)), bottom = Math.min(box.top + box.height, Math.max(ya, yb));
  out.push(`<rect class="band" x="${box.left.toFixed(2)}" y="${top.toFixed(2)}" width="${box.width.toFixed(2)}" height="${Math.max(0, bottom - top).toFixed(2)}" fill="#e6e6e6"/>`);
  out.push(svgText('unstable band', box.left + 4 * pt, bottom - 0.5 * T.tick * pt, T.tick * pt, { cls: 'band-label' }));
  let labelsEnd = -Infinity; // entry labels are set left to right, each only where it clears the last
  for (const c of course.clusters) {
    const ys = c.eigenvalues.map(map);
    out.push(polyline(frame, course.times, ys, { stroke: '#9a9a9a', width: 0.8, cls: 'cluster' }));
    // the part inside the band, in blue
    const inT: number[] = [], inY: number[] = [];
    course.times.forEach((t, k) => { if (c.eigenvalues[k] >= a && c.eigenvalues[k] <= b) { inT.push(t); inY.push(ys[k]); } });
    if (c.enters !== null && c.enters > 0) { inT.unshift(c.enters); inY.unshift(map(b)); }
    if (inT.length > 1) out.push(polyline(frame, inT, inY, { stroke: '#1f4e9c', width: 1.4, cls: 'in-band' }));
    if (c.enters !== null && c.enters > 0) {
      const cx = X(c.enters), cy = Y(map(b));
      out.push(`<circle class="entry" data-index="${c.index}" data-eigenvalue0="${c.eigenvalue0}" data-enters="${c.enters}" cx="${cx.toFixed(2)}" cy="${cy.toFixed(2)}" r="${(2.2 * pt).toFixed(2)}" fill="#1f4e9c"/>`);
      const label = `t = ${Number(c.enters.toPrecision(3))}`;
      const size = 0.9 * T.tick * pt;
      if (cx + 2 * pt > labelsEnd) {
        out.push(svgText(label, cx + 2 * pt, cy + (byWavelength ? -4 : 10) * pt, size, { cls: 'entry-label' }));
        labelsEnd = cx + 2 * pt + (textWidthEm(label) + 0.6) * size;
      }
    }
  }
  out.push(...frame.axes(), '</svg>');
  return out.join('\n') + '\n';
}
