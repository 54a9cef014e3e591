import { Option } from 'commander';
import type { RegisterCommand } from './CommandContext.ts';
import { note } from './CommandContext.ts';
import { UsageError } from '../../UsageError.ts';

/** `--landmark NAME=X,Y,Z:X,Y,Z…`: one point per stage, in the order the stages are given. */
function parseLandmark(text: string, stages: number): { name: string; points: [number, number, number][] } {
  const m = /^([A-Za-z][A-Za-z0-9_-]*)=(.+)$/.exec(text.trim());
  const usage = `--landmark ${text}: expected NAME=X,Y,Z:X,Y,Z… with one point per stage (${stages} here), e.g. tip=3,0,0:3.9,0,0`;
  if (!m) throw new UsageError(usage);
  const points = m[2].split(':').map((p) => p.split(',').map((v) => Number(v.trim())));
  if (points.length !== stages || points.some((p) => p.length !== 3 || !p.every(Number.isFinite))) throw new UsageError(usage);
  return { name: m[1], points: points as [number, number, number][] };
}

export const registerStages: RegisterCommand = (program, ctx) => {
  program
    .command('stages')
    .argument('<files...>', 'stage meshes in time order (.ply .obj .stl .off): the first is carried onto each next')
    .description('carry the first stage mesh onto the next ones as a keyframes growth would, and report how the tissue was stretched on the way')
    .option('-o, --out <file>', 'write the first mesh on the last stage, painted by local area change (log2 of the area ratio) and carrying it as the vertex property area_ratio')
    .addOption(new Option('--align <kind>', 'global map fitted before the smooth registration').choices(['none', 'rigid', 'similarity', 'affine']).default('affine'))
    .option('--landmark <spec>', 'NAME=X,Y,Z:X,Y,Z… one point per stage pinned to each other (repeat for several)', (v: string, acc: string[]) => [...acc, v], [] as string[])
    .option('--force', 'overwrite an existing output file')
    .option('--json', 'print the reports as JSON')
    .option('-q, --quiet', 'no progress lines')
    .action(async (files: string[], o: { out?: string; align: 'none' | 'rigid' | 'similarity' | 'affine'; landmark: string[]; force?: boolean; json?: boolean; quiet?: boolean }) => {
      if (files.length < 2) throw new UsageError('give at least two stage meshes: placode stages stage1.ply stage2.ply [stage3.ply…]');
      const landmarks = o.landmark.map((l) => parseLandmark(l, files.length));
      const { resolveMesh, requireFemReady } = await import('../meshSource.ts');
      const { mapOntoSurface, locateOnSurface } = await import('../../growth/mapOntoSurface.ts');
      const { stageMapReport, formatStageMap } = await import('../../growth/stageMapReport.ts');
      const meshes = [];
      for (const f of files) {
        const r = await resolveMesh(f, {});
        for (const w of requireFemReady(r.mesh, f)) note(o.quiet || o.json, `${f}: warning: ${w}`);
        meshes.push(r.mesh);
      }
      const first = meshes[0];
      const located = locateOnSurface(first, landmarks.map((l) => l.points[0]));
      let current: Float64Array = Float64Array.from(first.positions);
      const reports = [];
      for (let k = 1; k < meshes.length; k++) {
        const t0 = performance.now();
        const map = mapOntoSurface({ positions: current, triangles: first.triangles }, meshes[k], {
          alignment: o.align,
          landmarks: located.map((l, j) => ({ corners: l.corners, weights: l.weights, target: landmarks[j].points[k] })),
          onProgress: o.quiet || o.json || !process.stderr.isTTY ? undefined : (done, of) => process.stderr.write(`\rstage ${k + 1}: round ${done} of ${of}${done === of ? '\n' : ''}`),
        });
        const report = stageMapReport(first.triangles, current, map, meshes[k], { stage: k + 1, file: files[k], landmarkNames: landmarks.map((l) => l.name), seconds: (performance.now() - t0) / 1000 });
        reports.push(report);
        if (!o.json) process.stdout.write(formatStageMap(report) + '\n');
        current = map.positions;
        if (report.folded + report.collapsed + report.bridging > 0) ctx.setExitCode(2);
      }
      if (o.out) {
        const { vertexAreaRatio } = await import('../../growth/mapDistortion.ts');
        const { colorizeField } = await import('../../io/colormap.ts');
        const { saveMeshFile } = await import('../../io/meshFiles.ts');
        const ratio = vertexAreaRatio(first.triangles, first.positions, current);
        const log2 = ratio.map((v) => Math.log2(v));
        // the colour range: ±the 98th percentile of |log2 ratio| (a few stretched triangles at a rim would wash the rest out)
        const magnitudes = Float64Array.from(log2.filter(Number.isFinite).map(Math.abs)).sort();
        const extent = magnitudes[Math.floor(0.98 * (magnitudes.length - 1))] || 1;
        saveMeshFile(o.out, { positions: current, triangles: first.triangles }, {
          colors: colorizeField(log2, 'diverging', [-extent, extent]),
          properties: { area_ratio: ratio },
          comments: [`${files[0]} carried onto ${files.slice(1).join(' then ')}; colour: log2 of the local area ratio on a diverging map, ±${extent.toPrecision(3)}, beyond it clamped (red grew, blue shrank)`],
          force: o.force,
        });
        note(o.quiet || o.json, `wrote ${o.out} (coloured by log2 of the area ratio, ±${extent.toPrecision(3)}: red grew, blue shrank)`);
      }
      if (o.json) process.stdout.write(JSON.stringify({ stages: files, reports }, null, 2) + '\n');
    });
};
