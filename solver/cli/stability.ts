import { loadScenarioFile } from '../run/runScenarioFile.ts';
import { writeFileAtomic } from '../io/meshFiles.ts';
import { stabilityReport } from '../analysis/stabilityReport.ts';
import { parameterMap, parameterMapCsv, type MapAxis } from '../analysis/parameterMap.ts';
import { parameterMapSvg } from '../io/parameterMapSvg.ts';
import { saveModeFile } from './saveModeFile.ts';
import { UsageError } from '../UsageError.ts';
import { formatNumber } from './options.ts';
import { growthRate } from '../analysis/dispersion.ts';
import { dispersionFigureSvg } from '../io/dispersionFigure.ts';
import { svgToPng } from '../io/svgToPng.ts';
import type { Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { FIGURE_SIZE, SLIVER_ANGLE_DEGREES } from '../defaults.ts';
import { bandThroughGrowth, type BandCourse } from '../analysis/bandThroughGrowth.ts';
import { bandCourseFigureSvg } from '../io/bandCourseFigure.ts';

export interface StabilityOptions {
  json?: boolean;
  paint?: string;
  maxModes?: number;
  state?: number;
  map?: string[];
  mapOut?: string;
  /** the dispersion figure, .svg or .png */
  plot?: string;
  plotX?: 'k2' | 'wavelength';
  /** a growing scenario: the band through growth as a figure, .svg or .png */
  growthPlot?: string;
  /** surfaces sampled through growth where it is not a similarity */
  samples?: number;
  /** progress lines (stderr) */
  progress?: (line: string) => void;
  width?: number;
  height?: number;
  dpi?: number;
  force?: boolean;
}

/** `name=from:to:steps` → a map axis. */
export function parseMapAxis(text: string): MapAxis {
  const m = /^([A-Za-z][A-Za-z0-9_]*)=([^:]+):([^:]+):(\d+)$/.exec(text);
  if (!m) throw new UsageError(`--map "${text}" should read name=from:to:steps, e.g. --map F=0.01:0.08:40`);
  const [from, to, steps] = [Number(m[2]), Number(m[3]), Number(m[4])];
  if (!Number.isFinite(from) || !Number.isFinite(to) || from === to) throw new UsageError(`--map ${m[1]}: from and to must be two different numbers`);
  if (steps < 2 || steps > 400) throw new UsageError(`--map ${m[1]}: steps must be from 2 to 400`);
  return { name: m[1], from, to, steps };
}

const fmt = (x: number) => formatNumber(x, 5);

/** `placode stability`: the linear stability of a scenario and what it predicts on its surface. */
export function runStability(file: string, o: StabilityOptions, out: (s: string) => void): void {
  if (o.map && o.map.length !== 2) throw new UsageError('--map takes exactly two parameters (repeat it: --map F=…  --map k=…)');
  if (o.map && !o.mapOut) throw new UsageError('--map needs --map-out PREFIX (writes PREFIX.csv and PREFIX.svg)');
  if (o.plot && !/\.(svg|png)$/i.test(o.plot)) throw new UsageError(`--plot ${o.plot}: write .svg or .png`);
  if (o.growthPlot && !/\.(svg|png)$/i.test(o.growthPlot)) throw new UsageError(`--growth-plot ${o.growthPlot}: write .svg or .png`);
  if (o.plotX && o.plotX !== 'k2' && o.plotX !== 'wavelength') throw new UsageError(`--plot-x ${o.plotX}: choose k2 or wavelength`);
  const r = loadScenarioFile(file).resolved;
  const report = stabilityReport(r, { maxModes: o.maxModes, stateIndex: o.state });
  const { eigenpairs, ...data } = report;
  if (o.paint) {
    if (!report.predicted || !eigenpairs) throw new UsageError('--paint: no mode is predicted to grow, nothing to paint');
    saveModeFile(o.paint, r.mesh, eigenpairs.vectors[report.predicted.index], { force: o.force, comments: [`predicted pattern: eigenvalue ${report.predicted.eigenvalue}, growth rate ${report.predicted.rate}`] });
  }
  let mapFiles: string[] = [];
  if (o.map && o.mapOut) {
    const [xAxis, yAxis] = o.map.map(parseMapAxis);
    let cells;
    try {
      cells = parameterMap(r, xAxis, yAxis, report.state, eigenpairs?.values);
    } catch (e) {
      throw new UsageError(`--map: ${(e as Error).message}`);
    }
    writeFileAtomic(`${o.mapOut}.csv`, parameterMapCsv(cells, xAxis.name, yAxis.name), o.force);
    writeFileAtomic(`${o.mapOut}.svg`, parameterMapSvg(cells, xAxis, yAxis, `${r.name}: ${r.model}, steady state ${report.state}`), o.force);
    mapFiles = [`${o.mapOut}.csv`, `${o.mapOut}.svg`];
  }
  if (o.plot) {
    if (!report.jacobian) throw new UsageError('--plot: no steady state to analyse, so no dispersion relation to draw');
    writePlot(o.plot, o, (size) => dispersionPlot(r.name, r.model, r.units, report, eigenpairs, o, size));
  }
  let growth: BandCourse | null = null;
  if (r.growth && report.turing?.band && Number.isFinite(report.turing.band[1])) {
    growth = bandThroughGrowth(r.mesh, r.growth.makeLaw(r.mesh.positions, []), report.turing.band, r.end, {
      samples: o.samples, maxModes: o.maxModes,
      onProgress: (done, of) => { if (of > 1) o.progress?.(`  band through growth: surface ${done} of ${of}`); },
    });
  } else if (o.growthPlot) {
    throw new UsageError(r.growth ? '--growth-plot: the analysed state has no finite unstable band to follow' : '--growth-plot: the scenario has no growth section');
  }
  if (o.growthPlot && growth) {
    const course = growth;
    writePlot(o.growthPlot, o, (size) => bandCourseFigureSvg(course, { y: o.plotX, units: r.units, title: `${r.name}: the band through growth`, ...size }));
  }
  const files = [...(o.paint ? [o.paint] : []), ...mapFiles, ...(o.plot ? [o.plot] : []), ...(o.growthPlot ? [o.growthPlot] : [])];
  const growthData = growth && { method: growth.method, end: growth.end, notes: growth.notes, clusters: growth.clusters.map(({ eigenvalues: _, ...c }) => c) };
  // what the scenario's checks found that bears on the analysis: the mesh against the wavelength, slivers
  const warnings = [...r.warnings.filter((w) => /wavelength|sliver/.test(w))];
  const quality = (r.summary as { meshQuality?: { slivers: number } }).meshQuality;
  if (quality && quality.slivers > 0 && !warnings.some((w) => /sliver/.test(w))) warnings.push(`${quality.slivers} sliver triangle${quality.slivers > 1 ? 's' : ''} (an angle under ${SLIVER_ANGLE_DEGREES}°): their eigenvalues are less accurate; placode mesh names the worst`);
  if (o.json) {
    out(JSON.stringify({ ...data, warnings, ...(growthData ? { growth: growthData } : {}), files }, null, 2) + '\n');
    return;
  }
  const t = report.turing;
  const unit = r.units ? ` ${r.units}` : '', perArea = r.units ? ` ${r.units}⁻²` : '';
  out(`${r.name}: ${r.model} with ${Object.entries(report.parameters).map(([k, v]) => `${k}=${fmt(v)}`).join(', ')}; diffusion ${Object.entries(report.diffusion).map(([k, v]) => `${k}=${fmt(v)}`).join(', ')}\n`);
  for (const n of report.notes) out(`  note: ${n}\n`);
  for (const w of warnings) out(`  warning: ${w}\n`);
  out(`homogeneous steady states:\n`);
  report.steadyStates.forEach((s, i) => {
    const eig = s.eigenvalues.map(([re, im]) => (im === 0 ? fmt(re) : `${fmt(re)}${im > 0 ? '+' : '−'}${fmt(Math.abs(im))}i`)).join(', ');
    out(`  ${i === report.state ? '*' : ' '}${i}: ${Object.entries(s.values).map(([k, v]) => `${k}=${fmt(v)}`).join(', ')}  ${s.stableWithoutDiffusion ? 'stable' : 'unstable'} without diffusion (Jacobian eigenvalues ${eig}; ${s.source})\n`);
  });
  if (!t) return;
  if (t.conditions) {
    const c = t.conditions;
    const mark = (b: boolean) => (b ? 'yes' : 'NO');
    out(`Turing conditions for state ${report.state} (Murray, Mathematical Biology II, ch. 2):\n`);
    out(`  (i) f_u + g_v < 0: ${mark(c.traceNegative)}   (ii) det J > 0: ${mark(c.determinantPositive)}   (iii) d·f_u + g_v > 0: ${mark(c.diffusionDriven)}   (iv) (d·f_u + g_v)² > 4d·det J: ${mark(c.discriminantPositive)}\n`);
    if (t.criticalRatio !== undefined) out(`  critical diffusion ratio d_c = ${fmt(t.criticalRatio)} (here d = ${fmt(r.system.diffusion.length === 2 ? report.diffusion[r.species[1]] / report.diffusion[r.species[0]] : NaN)})\n`);
  }
  if (t.unstableWithoutDiffusion) out(`  state ${report.state} is unstable without diffusion${t.oscillatory ? ' (oscillatory: a Hopf-type instability)' : ''}: no Turing pattern selection\n`);
  else if (!t.band) out(`  no Turing instability: every mode decays\n`);
  else {
    out(`  unstable band ${fmt(t.band[0])} < k² < ${fmt(t.band[1])}${perArea}; fastest k² = ${fmt(t.fastest!.k2)}${perArea} (wavelength ${fmt((2 * Math.PI) / Math.sqrt(t.fastest!.k2))}${unit}), growth rate ${fmt(t.fastest!.rate)}\n`);
  }
  if (report.surface) {
    const s = report.surface;
    out(`surface: ${s.vertices} vertices, area ${fmt(s.area)}${r.units ? ` ${r.units}²` : ''}; ${s.modesComputed} Laplace–Beltrami modes (lumped mass) up to λ = ${fmt(s.largestEigenvalue)}\n`);
    if (report.modes.length) {
      out(`  modes in the band (index, eigenvalue, growth rate):\n`);
      for (const m of report.modes) out(`    ${String(m.index).padStart(5)}  ${fmt(m.eigenvalue).padEnd(12)} ${fmt(m.rate)}\n`);
    } else out(`  no surface mode lies in the band${t.band ? ': the surface is too small (or too coarse) for this wavelength' : ''}\n`);
    if (report.predicted) {
      const p = report.predicted;
      out(`  predicted initial pattern: mode ${p.index}${p.multiplicity > 1 ? `–${p.index + p.multiplicity - 1} (multiplicity ${p.multiplicity})` : ''}, eigenvalue ${fmt(p.eigenvalue)}, growth rate ${fmt(p.rate)}\n`);
    }
  }
  if (growth) {
    out(`through growth to t = ${fmt(growth.end)}: the band is fixed in k², the surface's eigenvalues fall as it grows (${growth.method === 'similarity' ? 'a similarity: λ(t) = λ(0)/ρ(t)²' : 'recomputed on the grown surface'})\n`);
    for (const n of growth.notes) out(`  note: ${n}\n`);
    if (!growth.clusters.length) out(`  no eigenvalue cluster reaches the band within the course\n`);
    else {
      out(`  cluster  λ(0)          ×   enters the band   leaves it\n`);
      for (const c of growth.clusters) out(`  ${String(c.index).padStart(7)}  ${fmt(c.eigenvalue0).padEnd(12)} ${String(c.multiplicity).padStart(2)}   ${(c.enters === null ? '—' : c.enters === 0 ? '0 (in it)' : `t = ${fmt(c.enters)}`).padEnd(16)}  ${c.leaves === null ? '—' : `t = ${fmt(c.leaves)}`}\n`);
    }
  }
  for (const f of files) out(`  wrote ${f}\n`);
}

/** A plot's size (the options', else the figures' width at a 0.62 aspect) drawn by `draw` and written as SVG, or PNG rendered from it. */
function writePlot(file: string, o: StabilityOptions, draw: (size: { width: number; height: number; dpi: number }) => string): void {
  const size = { width: o.width ?? FIGURE_SIZE.width, height: o.height ?? Math.round(FIGURE_SIZE.width * 0.62), dpi: o.dpi ?? FIGURE_SIZE.dpi };
  const svg = draw(size);
  writeFileAtomic(file, file.toLowerCase().endsWith('.png') ? svgToPng(svg, size.width, size.dpi) : svg, o.force);
}

/** The dispersion figure of a report: the curve, the band, every computed surface eigenvalue cluster on it. */
function dispersionPlot(name: string, model: string, units: string | undefined, report: ReturnType<typeof stabilityReport>, eigenpairs: Eigenpairs | null, o: StabilityOptions, size: { width: number; height: number; dpi: number }): string {
  const J = report.jacobian!.flat();
  const D = Object.values(report.diffusion);
  const marks = (eigenpairs?.clusters ?? []).map((c) => ({ eigenvalue: c.mean, multiplicity: c.size, rate: growthRate(J, D, c.mean) }));
  return dispersionFigureSvg({
    dispersion: report.dispersion, band: report.turing?.band ?? null, marks,
    predicted: report.predicted ? { eigenvalue: report.predicted.eigenvalue, multiplicity: report.predicted.multiplicity, rate: report.predicted.rate } : null,
    x: o.plotX, units, title: `${name}: ${model}, steady state ${report.state}`, ...size,
  });
}
