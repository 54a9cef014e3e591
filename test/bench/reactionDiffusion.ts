/**
 * Reaction–diffusion throughput on unit geodesic spheres, set up like
 * ../shared/perf-reference (Gray–Scott, D_u = 2e-5, D_v = 1e-5, F = 0.037,
 * k = 0.06; u = 1, v = 0 with 12 spots of radius 0.1; explicit dt half the
 * positivity bound 1/(D_max·max K_ii/m_i); the comparison solve is
 * (M + c·K)x = M·u₀ with c = D_u·100·dt_lim, warm start x₀ = u₀, ‖r‖/‖b‖ < 1e-8).
 * Each size is timed on 1 thread and on 2 (and on every core when there are
 * more), interleaved, best of 5 reps; when the C reference can be built
 * (BENCH_C_REFERENCE, default ../shared/perf-reference beside the package, and
 * gcc), it runs right after each size, so the ratios come from one run.
 * Memory is counted from the arrays a run keeps: the stepper's (`bytes()`) and the mesh.
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { availableParallelism, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper, type StepperOptions } from '../../solver/integrate/ReactionDiffusionStepper.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { explicitStepLimit } from '../../solver/integrate/explicitStepLimit.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import { nodeThreadTeam } from '../../solver/run/nodeThreads.ts';
import type { ThreadTeam } from '../../solver/integrate/ThreadTeam.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';
import { PACKAGE_ROOT } from '../../solver/packageRoot.ts';
import { localityOrder, renumberVertices, scatteredEdgeFraction } from '../../solver/mesh/localityOrder.ts';

const gs = MODELS['gray-scott'];
const kinetics = compileKinetics(gs.species, gs.reactions, Object.keys(gs.parameters));
const pure = compileKinetics(['u'], { u: '0' }, []);

function spots(mesh: Mesh, state: Float64Array): void {
  const p = mesh.positions, n = p.length / 3;
  const rand = seededRandom(12345);
  const centres: number[][] = [];
  for (let k = 0; k < 12; k++) {
    const z = 2 * rand() - 1, phi = 2 * Math.PI * rand(), r = Math.sqrt(1 - z * z);
    centres.push([r * Math.cos(phi), r * Math.sin(phi), z]);
  }
  for (let i = 0; i < n; i++) {
    state[2 * i] = 1; state[2 * i + 1] = 0;
    for (const c of centres) {
      if ((p[3 * i] - c[0]) ** 2 + (p[3 * i + 1] - c[1]) ** 2 + (p[3 * i + 2] - c[2]) ** 2 < 0.01) { state[2 * i] = 0.5; state[2 * i + 1] = 0.25; }
    }
  }
}

/** Best ms per call of `work` over `reps` reps of a count sized to ~targetMs, the candidates interleaved rep by rep. */
function interleaved(works: (() => void)[], targetMs = 250, reps = 5): number[] {
  const counts = works.map((w) => {
    w(); w();
    const t0 = performance.now();
    for (let k = 0; k < 3; k++) w();
    return Math.max(3, Math.round(targetMs / Math.max((performance.now() - t0) / 3, 1e-3)));
  });
  const best = works.map(() => Infinity);
  for (let r = 0; r < reps; r++) {
    works.forEach((w, c) => {
      const t0 = performance.now();
      for (let k = 0; k < counts[c]; k++) w();
      best[c] = Math.min(best[c], (performance.now() - t0) / counts[c]);
    });
  }
  return best;
}

interface CReference { vertexSteps: number; cgMs: number }

/** Build the C reference once (undefined, with the reason printed, where it cannot be). */
function buildCReference(): string | undefined {
  const dir = resolve(process.env.BENCH_C_REFERENCE ?? join(PACKAGE_ROOT, '..', 'shared', 'perf-reference'));
  if (!existsSync(join(dir, 'ref.c'))) {
    console.log(`(no C reference at ${dir}: set BENCH_C_REFERENCE to its directory for the ratio columns)`);
    return undefined;
  }
  const work = mkdtempSync(join(tmpdir(), 'placode-cref-'));
  process.on('exit', () => rmSync(work, { recursive: true, force: true }));
  try {
    execFileSync('gcc', ['-O3', '-march=native', '-o', join(work, 'ref'), join(dir, 'ref.c'), '-lm'], { stdio: 'pipe' });
    return join(work, 'ref');
  } catch (e) {
    console.log(`(the C reference did not build: ${(e as Error).message.split('\n')[0]})`);
    return undefined;
  }
}

/** The C reference at icosphere level L (best layout of its orderings). */
function runCReference(binary: string, level: number): CReference | undefined {
  try {
    const out = execFileSync(binary, ['-L', String(level), '-t', '0.06'], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 1 << 24 });
    const rows = out.trim().split('\n').map((l) => JSON.parse(l) as { vsteps_best: number; cg_ms_warm: number });
    return { vertexSteps: Math.max(...rows.map((r) => r.vsteps_best)), cgMs: Math.min(...rows.map((r) => r.cg_ms_warm)) };
  } catch (e) {
    console.log(`(the C reference failed at level ${level}: ${(e as Error).message.split('\n')[0]})`);
    return undefined;
  }
}

/** The explicit step on icosphere(nu) as built, shuffled, and shuffled then renumbered by localityOrder. */
function vertexOrderRows(nu: number, teams: Map<number, ThreadTeam | undefined>): string[] {
  const built = icosphere(nu, 1), n = built.positions.length / 3;
  const rand = seededRandom(3);
  const order = Uint32Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) { const j = Math.floor(rand() * (i + 1)); [order[i], order[j]] = [order[j], order[i]]; }
  const scattered = renumberVertices(built, order).mesh;
  const renumbered = renumberVertices(scattered, localityOrder(scattered)).mesh;
  return ([['as built', built], ['random', scattered], ['renumbered', renumbered]] as const).map(([name, mesh]) => {
    const K = cotanStiffness(mesh), m = lumpedMass(mesh);
    const dt = 0.5 * explicitStepLimit(K, m, 2e-5).safeUpTo;
    const works = [1, 2].map((t) => {
      const st = new ReactionDiffusionStepper({ mesh, kinetics, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] }, { scheme: 'explicit', dt, team: teams.get(t) }, { stiffness: K, mass: m });
      spots(mesh, st.state);
      let k = 0;
      return () => { st.step(k++); };
    });
    const [t1, t2] = interleaved(works);
    return `| ${name} | ${(100 * scatteredEdgeFraction(mesh)).toFixed(1)} % | ${fmt(t1)} | ${fmt(t2)} |`;
  });
}

const fmt = (x: number, digits = 3) => (x >= 100 ? x.toFixed(0) : x.toPrecision(digits));

export async function reactionDiffusionBench(frequencies: number[]): Promise<void> {
  const cores = availableParallelism();
  const threadCounts = [...new Set([1, 2, cores])].filter((t) => t <= Math.max(2, cores));
  const teams = new Map<number, ThreadTeam | undefined>();
  for (const t of threadCounts) teams.set(t, await nodeThreadTeam(t));
  const cBinary = buildCReference();
  const many = threadCounts.filter((t) => t > 2);

  const steps: string[] = [], solves: string[] = [], growth: string[] = [];
  for (const nu of frequencies) {
    const mesh = icosphere(nu, 1);
    const n = mesh.positions.length / 3;
    const K = cotanStiffness(mesh), m = lumpedMass(mesh);
    // what a run keeps besides the stepper: the mesh (its cached topology is released)
    const meshBytes = mesh.positions.byteLength + mesh.triangles.byteLength;
    const system = { mesh, kinetics, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] };
    const limit = explicitStepLimit(K, m, 2e-5);
    const make = (o: StepperOptions) => { const st = new ReactionDiffusionStepper(system, o, { stiffness: K, mass: m }); spots(mesh, st.state); return st; };
    const stepper = (o: StepperOptions) => { let t = 0; const st = make(o); return { st, work: () => { st.step(t++); } }; };

    // explicit and IMEX-CG on each thread count, interleaved
    const explicit = threadCounts.map((t) => stepper({ scheme: 'explicit', dt: 0.5 * limit.safeUpTo, team: teams.get(t) }));
    const tEx = interleaved(explicit.map((s) => s.work));
    const imex = threadCounts.map((t) => stepper({ scheme: 'imex', dt: 1, team: teams.get(t) }));
    const tIm = interleaved(imex.map((s) => s.work));
    const itIm = imex[0].st.totalIterations / imex[0].st.stepsTaken;
    const used = explicit.map((s) => s.st.threads);

    // a growing surface's geometry update (the law's positions given): 1 and 2 threads
    const growing = threadCounts.slice(0, 2).map((t) => {
      const st = new ReactionDiffusionStepper(system, { scheme: 'imex', dt: 1, growing: true, team: teams.get(t) });
      spots(mesh, st.state);
      const a = mesh.positions.map((x) => 1.001 * x), b = mesh.positions.map((x) => 1.002 * x);
      let flip = false;
      return { st, work: () => { const p = (flip = !flip) ? a : b; st.checkMove(p, 1e-3); st.setGeometry(p); } };
    });
    const tGeom = interleaved(growing.map((g) => g.work), 250, 3);

    let c: CReference | undefined;
    const level = Math.log2(nu);
    if (cBinary && Number.isInteger(level)) c = runCReference(cBinary, level);
    const mvs = (ms: number) => n / ms / 1e3;
    const ratio = (ms: number) => (c ? ` (${(mvs(ms) * 1e6 / c.vertexSteps).toFixed(2)}×)` : '');
    steps.push(`| ${n} | ${c ? fmt(c.vertexSteps / 1e6) : '—'} | ${fmt(mvs(tEx[0]))}${ratio(tEx[0])} | ${fmt(mvs(tEx[1]))}${ratio(tEx[1])}${used[1] < 2 ? ' (1 thread used)' : ''} |${many.map((_, k) => ` ${fmt(mvs(tEx[2 + k]))}${ratio(tEx[2 + k])} |`).join('')} ${fmt(tIm[0])} (${itIm.toFixed(1)}) | ${fmt(tIm[1])} (${(tIm[1] / tIm[0]).toFixed(2)}×) |${many.map((_, k) => ` ${fmt(tIm[2 + k])} |`).join('')} ${(explicit[0].st.bytes() / n).toFixed(0)} (${((explicit[0].st.bytes() + meshBytes) / n).toFixed(0)}) | ${(imex[0].st.bytes() / n).toFixed(0)} (${((imex[0].st.bytes() + meshBytes) / n).toFixed(0)}) |`);
    growth.push(`| ${n} | ${fmt(tGeom[0])} | ${fmt(tGeom[1])} (${(tGeom[1] / tGeom[0]).toFixed(2)}×) | ${(tGeom[0] / tIm[0]).toFixed(2)} | ${(tGeom[0] / tEx[0]).toFixed(1)} | ${((growing[0].st.bytes() - imex[0].st.bytes()) / n).toFixed(0)} |`);

    // the reference's solve: one species, c = D_u·dt_impl, b = M u₀, x₀ = u₀
    const dtImpl = 100 * limit.safeUpTo;
    const solveTime = (species: number, solver: 'cg' | 'cholesky', team?: ThreadTeam): [number, number] => {
      const sys = species === 1 ? { mesh, kinetics: pure, parameters: [], diffusion: [2e-5] } : { mesh, kinetics: compileKinetics(['u', 'v'], { u: '0', v: '0' }, []), parameters: [], diffusion: [2e-5, 2e-5] };
      const st = new ReactionDiffusionStepper(sys, { scheme: 'imex', dt: dtImpl, solver, team }, { stiffness: K, mass: m });
      const start = new Float64Array(n * species);
      const tmp = new Float64Array(2 * n);
      spots(mesh, tmp);
      for (let i = 0; i < n; i++) for (let s = 0; s < species; s++) start[i * species + s] = tmp[2 * i];
      let best = Infinity;
      for (let r = 0; r < 5; r++) {
        st.setState(start);
        const t0 = performance.now();
        st.step(0);
        best = Math.min(best, performance.now() - t0);
      }
      return [best, st.lastIterations[0]];
    };
    const [s1, it1] = solveTime(1, 'cg');
    const [s1t] = solveTime(1, 'cg', teams.get(2));
    const [s2] = solveTime(2, 'cg');
    const chol = n <= 200_000 ? solveTime(1, 'cholesky')[0] : undefined;
    const vsC = (ms: number) => (c ? ` (${(ms / c.cgMs).toFixed(2)}×)` : '');
    solves.push(`| ${n} | ${c ? fmt(c.cgMs) : '—'} | ${fmt(s1)} (${it1})${vsC(s1)} | ${fmt(s1t)}${vsC(s1t)} | ${fmt(s2)} | ${chol === undefined ? '—' : `${fmt(chol)}${vsC(chol)}`} |`);
    console.log(`  … ${n} vertices measured`);
  }
  const orderRows = frequencies.includes(128) ? vertexOrderRows(128, teams) : [];
  for (const t of teams.values()) t?.dispose();

  console.log(`\nGray–Scott stepping on unit geodesic spheres (1, 2${many.length ? `, ${many.join(', ')}` : ''} threads; best of 5 reps; ratios to one C thread)`);
  console.log(`| vertices | C explicit, 1 thread (M vertex-steps/s) | explicit, 1 thread | explicit, 2 threads |${many.map((t) => ` explicit, ${t} threads |`).join('')} IMEX-CG step dt = 1, 1 thread, ms (CG it.) | IMEX-CG, 2 threads, ms (ratio) |${many.map((t) => ` IMEX-CG, ${t} threads, ms |`).join('')} explicit bytes/vertex (with mesh) | IMEX-CG bytes/vertex (with mesh) |`);
  console.log(`|---:|---:|---:|---:|${many.map(() => '---:|').join('')}---:|---:|${many.map(() => '---:|').join('')}---:|---:|`);
  for (const row of steps) console.log(row);
  console.log('\nA growing surface: one geometry update (triangle check, K and M reassembled, U carried; the law\'s positions given)');
  console.log('| vertices | 1 thread, ms | 2 threads, ms (ratio) | in IMEX-CG steps | in explicit steps | extra bytes/vertex of a growing IMEX-CG run |');
  console.log('|---:|---:|---:|---:|---:|---:|');
  for (const row of growth) console.log(row);
  if (orderRows.length) {
    console.log('\nVertex order: the explicit step (ms) on the same sphere numbered as built, at random, and renumbered (reverse Cuthill–McKee, `reorder: true`)');
    console.log('| order | edges joining vertices > 4096 apart | 1 thread | 2 threads |');
    console.log('|---|---:|---:|---:|');
    for (const row of orderRows) console.log(row);
  }
  console.log('\nThe reference\'s solve (M + cK)x = Mu₀ (ms; ratio to the C solve)');
  console.log('| vertices | C CG | CG, 1 species (it.) | CG, 2 threads | CG, both species fused | Cholesky solve, 1 species |');
  console.log('|---:|---:|---:|---:|---:|---:|');
  for (const row of solves) console.log(row);
}
