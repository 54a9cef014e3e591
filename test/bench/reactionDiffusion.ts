/**
 * Reaction–diffusion throughput on unit geodesic spheres, set up like
 * ../shared/perf-reference (Gray–Scott, D_u = 2e-5, D_v = 1e-5, F = 0.037,
 * k = 0.06; u = 1, v = 0 with 12 spots of radius 0.1; explicit dt half the
 * positivity bound 1/(D_max·max K_ii/m_i); the comparison solve is
 * (M + c·K)x = M·u₀ with c = D_u·100·dt_lim, warm start x₀ = u₀, ‖r‖/‖b‖ < 1e-8).
 * Memory is counted from the arrays a run keeps: the stepper's (`bytes()`) and the mesh.
 */
import { icosphere } from '../../meshes/shapes/icosphere.ts';
import { MODELS } from '../../solver/kinetics/models/index.ts';
import { compileKinetics } from '../../solver/kinetics/compileKinetics.ts';
import { ReactionDiffusionStepper, type StepperOptions } from '../../solver/integrate/ReactionDiffusionStepper.ts';
import { cotanStiffness } from '../../solver/fem/cotanStiffness.ts';
import { lumpedMass } from '../../solver/fem/lumpedMass.ts';
import { explicitStepLimit } from '../../solver/integrate/explicitStepLimit.ts';
import { seededRandom } from '../../solver/linalg/seededRandom.ts';
import type { Mesh } from '../../solver/mesh/Mesh.ts';

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

function timeSteps(st: ReactionDiffusionStepper, targetMs: number, reps: number): number {
  let t = 0;
  const once = (count: number) => { const t0 = performance.now(); for (let k = 0; k < count; k++) st.step(t++); return performance.now() - t0; };
  once(5);
  const probe = once(5) / 5;
  const count = Math.max(3, Math.round(targetMs / Math.max(probe, 1e-3)));
  let best = Infinity;
  for (let r = 0; r < reps; r++) best = Math.min(best, once(count) / count);
  return best;
}

export function reactionDiffusionBench(sizes: number[]): void {
  console.log('\nGray–Scott stepping on unit geodesic spheres (single thread; best of 5 reps)');
  console.log('| vertices | explicit ms/step | explicit Mvertex-steps/s | explicit bytes/vertex (run total) | IMEX-CG dt=1 ms/step (CG it) | IMEX-CG bytes/vertex (run total) | IMEX-Cholesky dt=1 ms/step (setup) | solve (M+cK)x=Mu₀: 1 species CG ms (it) | 2 species fused CG ms | 1 species Cholesky ms | geometry update ms |');
  console.log('|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|');
  for (const nu of sizes) {
    const mesh = icosphere(nu, 1);
    const n = mesh.positions.length / 3;
    const K = cotanStiffness(mesh), m = lumpedMass(mesh);
    // what a run keeps besides the stepper: the mesh (its cached topology is released)
    const meshBytes = mesh.positions.byteLength + mesh.triangles.byteLength;
    const system = { mesh, kinetics, parameters: [0.037, 0.06], diffusion: [2e-5, 1e-5] };
    const limit = explicitStepLimit(K, m, 2e-5);
    const make = (o: StepperOptions) => { const st = new ReactionDiffusionStepper(system, o, { stiffness: K, mass: m }); spots(mesh, st.state); return st; };
    const ex = make({ scheme: 'explicit', dt: 0.5 * limit.safeUpTo });
    const tEx = timeSteps(ex, 300, 5);
    const im = make({ scheme: 'imex', dt: 1 });
    const tIm = timeSteps(im, 300, 5);
    const itIm = im.totalIterations / im.stepsTaken;
    let chol = '—';
    if (n <= 50_000) {
      const t0 = performance.now();
      const ch = make({ scheme: 'imex', dt: 1, solver: 'cholesky' });
      const setup = performance.now() - t0;
      chol = `${timeSteps(ch, 300, 5).toFixed(2)} (${(setup / 1000).toFixed(1)} s)`;
    }
    // the reference's solve: one species, c = D_u·dt_impl, b = M u₀, x₀ = u₀
    const dtImpl = 100 * limit.safeUpTo;
    const solveTime = (species: number, solver: 'cg' | 'cholesky' = 'cg'): [number, number] => {
      const sys = species === 1 ? { mesh, kinetics: pure, parameters: [], diffusion: [2e-5] } : { mesh, kinetics: compileKinetics(['u', 'v'], { u: '0', v: '0' }, []), parameters: [], diffusion: [2e-5, 2e-5] };
      const st = new ReactionDiffusionStepper(sys, { scheme: 'imex', dt: dtImpl, solver }, { stiffness: K, mass: m });
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
    const [s1, it1] = solveTime(1);
    const [s2] = solveTime(2);
    const [sc] = solveTime(1, 'cholesky');
    // a geometry update of a growing run: transfer, K and M reassembled into the ELL slots
    const growing = new ReactionDiffusionStepper(system, { scheme: 'explicit', dt: 0.5 * limit.safeUpTo, growing: true });
    let tGeom = Infinity;
    for (let r = 0; r < 5; r++) {
      const moved = mesh.positions.map((x) => x * (1 + 1e-3 * (r + 1)));
      const t0 = performance.now();
      growing.setGeometry(moved);
      tGeom = Math.min(tGeom, performance.now() - t0);
    }
    console.log(`| ${n} | ${tEx.toFixed(3)} | ${(n / tEx / 1e3).toFixed(1)} | ${(ex.bytes() / n).toFixed(0)} (${((ex.bytes() + meshBytes) / n).toFixed(0)}) | ${tIm.toFixed(2)} (${itIm.toFixed(1)}) | ${(im.bytes() / n).toFixed(0)} (${((im.bytes() + meshBytes) / n).toFixed(0)}) | ${chol} | ${s1.toFixed(1)} (${it1}) | ${s2.toFixed(1)} | ${sc.toFixed(1)} | ${tGeom.toFixed(1)} |`);
  }
}
