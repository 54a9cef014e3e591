/**
 * `npm run bench`: timings of the surface-FEM foundation on geodesic spheres of
 * ~10k / 40k / 160k vertices, the reaction–diffusion stepping (threads, the C
 * reference beside it) up to 655k, and the largest shapes the generators build.
 * Set BENCH_SIZES="32 64" (icosphere frequencies) to run a subset of the FEM
 * table, BENCH_RD_SIZES="32 64 128 256" of the stepping; BENCH_EIGEN=0 skips the
 * eigen-solves, BENCH_RD=0 the reaction–diffusion stepping, BENCH_FEM=0 the
 * assembly table, BENCH_SHAPES=0 the shapes, BENCH_SWEEP=0 the local sweep pool.
 * Machines are noisy: compare ratios within one run.
 */
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import { meshTopology } from '../../solver/mesh/meshTopology.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { consistentMass } from '../../solver/fem/consistentMass.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { vertexSparsityPattern } from '../../solver/fem/vertexSparsityPattern.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { reactionDiffusionBench } from './reactionDiffusion.ts';
import { sweepPoolBench } from './sweepPool.ts';

const sizes = (process.env.BENCH_SIZES ?? '32 64 128').split(/\s+/).filter(Boolean).map(Number);
const eigen = process.env.BENCH_EIGEN !== '0';
const ms = (t: number) => `${t.toFixed(0)} ms`;

function best(f: () => void, reps = 3): number {
  let b = Infinity;
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    f();
    b = Math.min(b, performance.now() - t0);
  }
  return b;
}

if (process.env.BENCH_FEM !== '0') {
console.log('Surface FEM assembly and eigenpairs on unit geodesic spheres');
console.log('| vertices | topology + pattern | K + M + lumped (reassembly) | 50 eigenpairs | nnz(L) |');
console.log('|---:|---:|---:|---:|---:|');
for (const nu of sizes) {
  const mesh = icosphere(nu);
  const n = mesh.positions.length / 3;
  const t0 = performance.now();
  meshTopology(mesh);
  vertexSparsityPattern(mesh);
  const tTopo = performance.now() - t0;
  const K = cotanStiffness(mesh);
  const M = consistentMass(mesh);
  const L = lumpedMass(mesh);
  const tAsm = best(() => { cotanStiffness(mesh, K); consistentMass(mesh, M); lumpedMass(mesh, L); });
  let eig = '—', fill = '—';
  if (eigen) {
    const t1 = performance.now();
    const r = laplaceBeltramiEigenpairs(mesh, { count: 50, method: 'sparse' });
    eig = `${((performance.now() - t1) / 1000).toFixed(1)} s`;
    fill = String(r.stats.factorNonZeros);
  }
  console.log(`| ${n} | ${ms(tTopo)} | ${ms(tAsm)} | ${eig} | ${fill} |`);
}
}

if (process.env.BENCH_RD !== '0') await reactionDiffusionBench((process.env.BENCH_RD_SIZES ?? '32 64 128 256').split(/\s+/).filter(Boolean).map(Number));

if (process.env.BENCH_SHAPES !== '0') {
  console.log('\nShapes at a 200k-vertex target');
  console.log('| shape | vertices | build |');
  console.log('|---|---:|---:|');
  for (const name of Object.keys(SHAPES)) {
    const t0 = performance.now();
    const { mesh } = buildShape({ shape: name, vertices: 200_000 });
    console.log(`| ${name} | ${mesh.positions.length / 3} | ${ms(performance.now() - t0)} |`);
  }
}

if (process.env.BENCH_REMESH !== '0') {
  // isotropic remeshing of the scan-like bud (marching tetrahedra: slivers, terraces), coarsening 10×
  const { isotropicRemesh } = await import('../../solver/mesh/isotropicRemesh.ts');
  const { meshQuality } = await import('../../solver/fem/meshQuality.ts');
  console.log('\nIsotropic remeshing of scan-bud (coarsening about 10×; 8 rounds)');
  console.log('| input vertices | triangles | output vertices | seconds | peak RSS | min angle in → out | explicit step (of a well-shaped mesh\'s) in → out |');
  console.log('|---:|---:|---:|---:|---:|---:|---:|');
  for (const target of (process.env.BENCH_REMESH_SIZES ?? '20000 60000 200000').split(/\s+/).filter(Boolean).map(Number)) {
    const input = buildShape({ shape: 'scan-bud', vertices: target }).mesh;
    const qi = meshQuality(input);
    const t0 = performance.now();
    const r = isotropicRemesh(input, { vertices: Math.round(target / 10) });
    const seconds = (performance.now() - t0) / 1000;
    const qo = meshQuality(r.mesh);
    console.log(`| ${input.positions.length / 3} | ${input.triangles.length / 3} | ${r.mesh.positions.length / 3} | ${seconds.toFixed(1)} | ${Math.round(process.memoryUsage().rss / 2 ** 20)} MB | ${qi.angles.min.toFixed(1)}° → ${qo.angles.min.toFixed(1)}° | ${qi.explicitStepRatio.toFixed(4)} → ${qo.explicitStepRatio.toFixed(3)} |`);
  }
}

if (process.env.BENCH_STAGES !== '0') {
  // carrying a limb-bud stage onto a later one meshed separately (30 % longer, paddle 25 % wider, 1.2× the vertices)
  const { mapOntoSurface } = await import('../../solver/growth/mapOntoSurface.ts');
  console.log('\nStage to stage: a limb bud onto its next stage (30 % longer, paddle 25 % wider), affine + smooth registration');
  console.log('| source vertices | stage vertices | seconds | folded | collapsed | across gaps |');
  console.log('|---:|---:|---:|---:|---:|---:|');
  for (const n of (process.env.BENCH_STAGES_SIZES ?? '10000 50000').split(/\s+/).filter(Boolean).map(Number)) {
    const a = buildShape({ shape: 'limb-bud', vertices: n }).mesh;
    const b = buildShape({ shape: 'limb-bud', params: { length: 3.9, paddleWidth: 1.25 }, vertices: Math.round(1.2 * n) }).mesh;
    const t0 = performance.now();
    const map = mapOntoSurface(a, b);
    console.log(`| ${a.positions.length / 3} | ${b.positions.length / 3} | ${((performance.now() - t0) / 1000).toFixed(1)} | ${map.folded.length} | ${map.collapsed.length} | ${map.bridging.length} |`);
  }
}

if (process.env.BENCH_SWEEP !== '0') await sweepPoolBench();
