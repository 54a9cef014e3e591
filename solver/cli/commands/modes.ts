import { Option } from 'commander';
import type { RegisterCommand } from './CommandContext.ts';
import { note } from './CommandContext.ts';
import type { MeshSourceOptions } from '../meshSource.ts';
import { addMeshOptions, parseCount, formatNumber as fmt } from '../options.ts';
import { UsageError } from '../../UsageError.ts';
import { DEFAULT_MODE_COUNT, EIGEN_CLUSTER_TOLERANCE } from '../../defaults.ts';

type ModesOptions = MeshSourceOptions & { count: string; mass: 'consistent' | 'lumped'; laplacian: 'cotangent' | 'intrinsic-delaunay'; paint?: string; outDir: string; clusterTol: string; force?: boolean; json?: boolean; quiet?: boolean };

export const registerModes: RegisterCommand = (program) => {
  addMeshOptions(
    program
      .command('modes')
      .argument('<shape|file>', 'built-in shape name or mesh file')
      .description('lowest Laplace–Beltrami eigenvalues (K φ = λ M φ) and, on request, painted eigenmodes'),
  )
    .option('-n, --count <n>', 'number of eigenpairs', String(DEFAULT_MODE_COUNT))
    .addOption(new Option('--mass <kind>', 'mass matrix').choices(['consistent', 'lumped']).default('consistent'))
    .addOption(new Option('--laplacian <kind>', 'cotangent on the mesh, or on its intrinsic Delaunay triangulation (nonnegative weights on poor triangles; lumped mass)').choices(['cotangent', 'intrinsic-delaunay']).default('cotangent'))
    .option('--paint <indices>', 'comma-separated mode indices (0 = constant mode) to write as painted PLY files')
    .option('--out-dir <dir>', 'directory for painted modes', 'modes')
    .option('--cluster-tol <rel>', 'relative gap under which eigenvalues count as one multiple eigenvalue', String(EIGEN_CLUSTER_TOLERANCE))
    .option('--force', 'overwrite existing files')
    .option('--json', 'print {"eigenvalues": [...], "area": A, "vertices": n, ...} as JSON')
    .option('-q, --quiet', 'no progress messages')
    .action(async (spec: string, o: ModesOptions) => {
      const count = parseCount(o.count, '--count', 1)!;
      const clusterTolerance = Number(o.clusterTol);
      if (!(clusterTolerance >= 0)) throw new UsageError(`--cluster-tol must be a number ≥ 0, got "${o.clusterTol}"`);
      const paint = o.paint ? o.paint.split(',').map((s) => parseCount(s.trim(), '--paint index')!) : [];
      for (const k of paint) if (k >= count) throw new UsageError(`--paint index ${k} is not below --count ${count}`);
      const { resolveMesh, requireFemReady } = await import('../meshSource.ts');
      const { laplaceBeltramiEigenpairs } = await import('../../fem/laplaceBeltramiEigenpairs.ts');
      const { meshArea } = await import('../../mesh/triangleAreas.ts');
      const r = await resolveMesh(spec, o);
      for (const w of requireFemReady(r.mesh, spec)) note(o.quiet, `warning: ${w}`);
      const n = r.mesh.positions.length / 3;
      note(o.quiet, `computing ${count} eigenpairs on ${n} vertices (${o.laplacian === 'intrinsic-delaunay' ? 'intrinsic Delaunay Laplacian, lumped' : o.mass} mass)…`);
      const t0 = performance.now();
      let last = -1;
      let operators;
      if (o.laplacian === 'intrinsic-delaunay') {
        const { intrinsicDelaunayOperators } = await import('../../fem/intrinsicDelaunay.ts');
        const idt = intrinsicDelaunayOperators(r.mesh);
        operators = { stiffness: idt.stiffness, mass: idt.mass };
        note(o.quiet, `intrinsic Delaunay triangulation: ${idt.flips} edge flip(s); lumped mass`);
      }
      const eig = laplaceBeltramiEigenpairs(r.mesh, {
        count, mass: o.mass, clusterTolerance, operators,
        onProgress: (done, wanted) => {
          if (done !== last) { last = done; note(o.quiet, `  ${done}/${wanted} converged`); }
        },
      });
      const seconds = (performance.now() - t0) / 1000;
      const area = meshArea(r.mesh);
      const written: string[] = [];
      if (paint.length > 0) {
        const { ensureDirectory } = await import('../../io/fileAccess.ts');
        const { join } = await import('node:path');
        const { saveModeFile } = await import('../saveModeFile.ts');
        ensureDirectory(o.outDir, (m) => new UsageError(m));
        for (const k of paint) {
          const file = join(o.outDir, `mode-${String(k).padStart(3, '0')}.ply`);
          saveModeFile(file, r.mesh, eig.vectors[k], { force: o.force, comments: [`eigenvalue ${eig.values[k]}`] });
          written.push(file);
        }
      }
      if (o.json) {
        process.stdout.write(JSON.stringify({
          eigenvalues: Array.from(eig.values), area, vertices: n,
          multiplicities: eig.clusters.map((c) => ({ eigenvalue: c.mean, multiplicity: c.size, first: c.first })),
          mass: operators ? 'lumped' : o.mass, laplacian: o.laplacian, method: eig.method, seconds, files: written,
        }, null, 2) + '\n');
      } else {
        process.stdout.write(`${spec}: ${n} vertices, area ${fmt(area)}, ${o.laplacian === 'intrinsic-delaunay' ? 'intrinsic Delaunay Laplacian, lumped' : o.mass} mass, ${eig.method} solver, ${seconds.toFixed(2)} s\n`);
        process.stdout.write('  index  eigenvalue      multiplicity\n');
        for (const c of eig.clusters) {
          process.stdout.write(`  ${String(c.first).padStart(5)}  ${fmt(c.mean).padEnd(14)}  ${c.size}\n`);
        }
        for (const f of written) process.stdout.write(`  wrote ${f}\n`);
      }
    });
};
