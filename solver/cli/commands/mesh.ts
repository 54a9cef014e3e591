import type { RegisterCommand } from './CommandContext.ts';
import type { MeshSourceOptions } from '../meshSource.ts';
import { addMeshOptions, formatNumber as fmt } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { SCATTERED_ORDER_FRACTION, SCATTERED_ORDER_VERTICES } from '../../defaults.ts';

export const registerMesh: RegisterCommand = (program, ctx) => {
  addMeshOptions(
    program
      .command('mesh')
      .argument('<shape|file>', 'built-in shape name or mesh file (.ply .obj .stl .off)')
      .description('build or load a mesh, check it, print its statistics, optionally write it out'),
  )
    .option('-o, --out <file>', 'write the mesh (.ply .obj .stl .off by extension)')
    .option('--ascii', 'write PLY as ASCII instead of binary')
    .option('--force', 'overwrite an existing output file')
    .option('--json', 'print the statistics as JSON')
    .action(async (spec: string, o: MeshSourceOptions & { out?: string; ascii?: boolean; force?: boolean; json?: boolean }) => {
      // (a scan's unit goes into the file written, as a header comment, and the scale is applied to it)
      const { resolveMesh } = await import('../meshSource.ts');
      const { meshStatistics } = await import('../../mesh/meshStatistics.ts');
      const r = await resolveMesh(spec, o);
      const stats = meshStatistics(r.mesh);
      const { meshQuality, qualityWarnings } = await import('../../fem/meshQuality.ts');
      const quality = stats.errors.length ? undefined : meshQuality(r.mesh);
      if (quality) stats.warnings.push(...qualityWarnings(quality));
      // the per-vertex data the mesh carries (a measured morphogen map, say), with its range
      const data = Object.entries(r.vertexData ?? {}).map(([name, v]) => {
        let min = Infinity, max = -Infinity;
        for (const x of v) { min = Math.min(min, x); max = Math.max(max, x); }
        return { name, min, max };
      });
      const { scatteredEdgeFraction, LOCALITY_WINDOW } = await import('../../mesh/localityOrder.ts');
      const scattered = scatteredEdgeFraction(r.mesh);
      if (!o.reorder && stats.vertices >= SCATTERED_ORDER_VERTICES && scattered > SCATTERED_ORDER_FRACTION) {
        r.notes.push(`the vertex order is scattered (${Math.round(100 * scattered)} % of edges join vertices more than ${LOCALITY_WINDOW} apart): stepping on it is up to 3× slower; --reorder renumbers it`);
      }
      if (o.out) {
        if (stats.errors.length > 0) throw new UsageError(`not writing ${o.out}: the mesh has errors:\n  - ${stats.errors.join('\n  - ')}`);
        const { saveMeshFile } = await import('../../io/meshFiles.ts');
        const { VERSION } = await import('../../version.ts');
        saveMeshFile(o.out, r.mesh, { encoding: o.ascii ? 'ascii' : 'binary', force: o.force, properties: r.vertexData, comments: [`placode ${VERSION}`, ...(o.units ? [`units ${o.units}`] : [])] });
      }
      if (o.json) {
        process.stdout.write(JSON.stringify({ ...stats, ...(o.units ? { units: o.units } : {}), quality, vertexData: data }, null, 2) + '\n');
      } else {
        const e = stats.edgeLength;
        const u = o.units ? ` ${o.units}` : '';
        process.stdout.write(
          `${spec}: ${stats.vertices} vertices, ${stats.triangles} triangles\n` +
            `  area ${fmt(stats.area)}${o.units ? ` ${o.units}²` : ''}, ${genusText(stats)}, ${stats.boundaryLoops} boundary loop(s), ${stats.components} component(s), Euler characteristic ${stats.eulerCharacteristic}\n` +
            `  edge length min ${fmt(e.min)} mean ${fmt(e.mean)} max ${fmt(e.max)}${u}\n` +
            (quality
              ? `  angles min ${quality.angles.min.toFixed(2)}° (1st percentile ${quality.angles.p1.toFixed(1)}°, max ${quality.angles.max.toFixed(1)}°), mean smallest angle per triangle ${quality.meanMinimumAngle.toFixed(1)}°\n` +
                `  radius ratio 2r/R min ${quality.radiusRatio.min.toFixed(3)} (1st percentile ${quality.radiusRatio.p1.toFixed(3)}, mean ${quality.radiusRatio.mean.toFixed(3)}); ${(100 * quality.obtuseShare).toFixed(1)} % obtuse, ${quality.slivers} sliver(s)\n` +
                `  explicit step limit ${quality.explicitStepRatio >= 0.995 ? 'as' : `${(100 * quality.explicitStepRatio).toPrecision(3)} % of`} a well-shaped mesh's of this size\n`
              : '') +
            data.map((d) => `  vertex data ${d.name}: ${fmt(d.min)} … ${fmt(d.max)}\n`).join(''),
        );
        for (const n of r.notes) process.stdout.write(`  note: ${n}\n`);
        for (const w of stats.warnings) process.stdout.write(`  warning: ${w}\n`);
        for (const w of stats.errors) process.stdout.write(`  error: ${w}\n`);
        if (o.out) process.stdout.write(`  wrote ${o.out}\n`);
      }
      if (stats.errors.length > 0) ctx.setExitCode(1);
    });
};

/** "genus 1", "genus 1 (components 0 and 1)", or why there is none. */
function genusText(stats: { genus: number; componentGenus?: number[] }): string {
  const each = stats.componentGenus;
  if (Number.isNaN(stats.genus)) {
    const bad = each ? each.map((g, c) => (Number.isNaN(g) ? c : -1)).filter((c) => c >= 0) : [0];
    return `no genus (${each ? `component${bad.length > 1 ? 's' : ''} ${bad.join(', ')} ${bad.length > 1 ? 'are' : 'is'}` : 'the surface is'} not an orientable manifold)`;
  }
  return each ? `genus ${stats.genus} (components: ${each.join(', ')})` : `genus ${stats.genus}`;
}
