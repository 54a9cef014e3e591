import { describe, expect, it } from 'vitest';
import { runCli as run } from '../fixtures/cli.ts';
import { useTempFiles } from '../fixtures/tempFiles.ts';
import { icosphere, icosahedron } from '../../meshes/shapes/icosphere.ts';
import { makeMesh, type Mesh } from '../../solver/mesh/Mesh.ts';
import { saveMeshFile } from '../../solver/io/meshFiles.ts';
import { meshQuality } from '../../solver/fem/meshQuality.ts';
import { laplaceBeltramiEigenpairs } from '../../solver/fem/laplaceBeltramiEigenpairs.ts';
import { edgeLengthStats } from '../../solver/mesh/edgeLengthStats.ts';
import { MIN_EDGES_PER_WAVELENGTH } from '../../solver/defaults.ts';

const temp = useTempFiles('placode-quality-');

/** An icosphere with a few triangles split by a point almost on one of their edges: slivers, as a scan's mesher leaves them. */
function withSlivers(mesh: Mesh, count: number): Mesh {
  const p = Array.from(mesh.positions), t = Array.from(mesh.triangles);
  for (let k = 0; k < count; k++) {
    const f = 37 * k + 5;
    const [a, b, c] = [t[3 * f], t[3 * f + 1], t[3 * f + 2]];
    // a point on edge ab, a thousandth of its length from a: triangles (a, v, c) and (v, a, o) become slivers
    const m = [0, 1, 2].map((d) => p[3 * a + d] + 1e-3 * (p[3 * b + d] - p[3 * a + d]));
    const v = p.length / 3;
    p.push(...m);
    t.splice(3 * f, 3, a, v, c);
    t.push(v, b, c);
    // the neighbour across ab keeps its edge: the new vertex sits on it (a T-junction would be a crack), so split it too
    for (let g = 0; g < t.length / 3; g++) {
      if (g === f) continue;
      const tri = [t[3 * g], t[3 * g + 1], t[3 * g + 2]];
      const i = tri.findIndex((x, j) => x === b && tri[(j + 1) % 3] === a);
      if (i < 0) continue;
      const o = tri[(i + 2) % 3];
      t.splice(3 * g, 3, b, v, o);
      t.push(v, a, o);
      break;
    }
  }
  return makeMesh(Float64Array.from(p), Uint32Array.from(t));
}

describe('mesh quality', () => {
  it('the explicit step ratio is ideal/actual = (2√3·n/A)/(4/h²) = 1.2 on the regular icosahedron (closed form)', () => {
    const { corners, faces } = icosahedron();
    const mesh = makeMesh(Float64Array.from(corners.flat()), Uint32Array.from(faces.flat()));
    const q = meshQuality(mesh);
    // equilateral faces of edge h: K_ii/m_i = 4/h² at every vertex; n = 12, A = 5√3h²
    expect(q.explicitStepRatio).toBeCloseTo(1.2, 10);
    expect(q.angles.min).toBeCloseTo(60, 10);
    expect(q.angles.max).toBeCloseTo(60, 10);
    expect(q.radiusRatio.min).toBeCloseTo(1, 10);
    expect(q.slivers).toBe(0);
    expect(q.obtuseShare).toBe(0);
  });

  it('slivers are counted, the worst named with their vertices, and their cost to the explicit step stated; placode mesh and run --check warn', async () => {
    const mesh = withSlivers(icosphere(8, 1), 4);
    const q = meshQuality(mesh);
    expect(q.slivers).toBeGreaterThanOrEqual(4);
    expect(q.angles.min).toBeLessThan(0.1);
    expect(q.explicitStepRatio).toBeLessThan(0.02);
    const file = temp.path('slivers.ply');
    saveMeshFile(file, mesh);
    const m = await run('mesh', file, '--json');
    expect(m.code, m.err).toBe(0);
    const j = JSON.parse(m.out);
    expect(j.quality.slivers).toBe(q.slivers);
    const worst = j.quality.worst[0];
    expect(j.warnings.join('\n')).toContain(`triangle ${worst.triangle} (vertices ${worst.vertices.join(', ')}`);
    expect(j.warnings.join('\n')).toMatch(/use scheme: imex/);
    const scenario = temp.write('slivers.yaml', `mesh: {file: ${file}}\nkinetics: {model: gray-scott}\ntime: {scheme: explicit, end: 10}\n`);
    const check = await run('run', scenario, '--check');
    expect(check.code, check.err).toBe(0);
    expect(JSON.parse(check.out).warnings.join('\n')).toMatch(/sliver triangles .* the worst: triangle \d+/);
    // the same mesh, well shaped: no warning
    const good = temp.path('good.ply');
    saveMeshFile(good, icosphere(8, 1));
    expect(JSON.parse((await run('mesh', good, '--json')).out).warnings).toEqual([]);
  });

  it('the edges-per-wavelength threshold rests on the P1 eigenvalue error, second order in h (Dziuk 1988): about 2.4 %·(10/N)² on the unit sphere', () => {
    // the refinement study behind MIN_EDGES_PER_WAVELENGTH, on two meshes: the degree-l cluster's mean
    // eigenvalue against l(l+1), with N = (2π/√(l(l+1)))/h mean edges per wavelength
    for (const f of [10, 16]) {
      const mesh = icosphere(f, 1);
      const h = edgeLengthStats(mesh).mean;
      const eig = laplaceBeltramiEigenpairs(mesh, { count: 150, mass: 'lumped' });
      for (let l = 3; (l + 1) ** 2 <= 150; l++) {
        let s = 0;
        for (let j = l * l; j < (l + 1) ** 2; j++) s += eig.values[j];
        const error = 1 - s / (2 * l + 1) / (l * (l + 1));
        const N = (2 * Math.PI) / Math.sqrt(l * (l + 1)) / h;
        const fit = 0.024 * (10 / N) ** 2;
        expect(error / fit).toBeGreaterThan(0.6);
        expect(error / fit).toBeLessThan(1.6);
        if (Math.abs(N - MIN_EDGES_PER_WAVELENGTH) < 1) expect(error).toBeLessThan(0.06);
      }
    }
  });

  it('run --check and stability warn when the fastest wavelength spans fewer edges than the threshold, and not on a fine enough mesh', async () => {
    // Schnakenberg γ = 200 on the unit sphere: fastest k² ≈ 64 (γ·0.32), wavelength 2π/8 ≈ 0.79
    const coarse = temp.write('coarse.yaml', 'mesh: {shape: sphere, vertices: 200}\nkinetics: {model: schnakenberg, parameters: {gamma: 200}}\ntime: {end: 1}\n');
    const fine = temp.write('fine.yaml', 'mesh: {shape: sphere, vertices: 5000}\nkinetics: {model: schnakenberg, parameters: {gamma: 200}}\ntime: {end: 1}\n');
    const c = JSON.parse((await run('run', coarse, '--check')).out);
    expect(c.warnings.join('\n')).toMatch(/fastest-growing wavelength 2π\/√k² = 0\.7\d+ spans only [0-9.]+ mean edges/);
    expect(JSON.parse((await run('run', fine, '--check')).out).warnings.join('\n')).not.toMatch(/wavelength/);
    const s = await run('stability', coarse);
    expect(s.out).toMatch(/warning: the fastest-growing wavelength/);
  }, 60_000);
});

describe('length units', () => {
  it('mesh.scale multiplies the coordinates (eigenvalues go as 1/scale², exactly); mesh.units labels lengths, k² and areas; a mismatch of units is named', async () => {
    const plain = JSON.parse((await run('modes', 'sphere', '--vertices', '300', '-n', '6', '--json')).out);
    const scaled = JSON.parse((await run('modes', 'sphere', '--vertices', '300', '-n', '6', '--json', '--scale', '1000')).out);
    for (let k = 1; k < 6; k++) expect(scaled.eigenvalues[k] * 1e6).toBeCloseTo(plain.eigenvalues[k], 6);
    expect(scaled.area / plain.area).toBeCloseTo(1e6, 3);
    // Schnakenberg γ = 200 on the unit sphere, but the mesh read in µm (×1000): the wavelength ~0.8 µm on a 3.5 mm sphere
    const wrong = temp.write('um.yaml', 'mesh: {shape: sphere, vertices: 2000, scale: 1000, units: µm}\nkinetics: {model: schnakenberg, parameters: {gamma: 200}}\ntime: {end: 1}\n');
    const w = JSON.parse((await run('run', wrong, '--check')).out);
    expect(w.warnings.join('\n')).toMatch(/wavelength 2π\/√k² = 0\.7\d+ µm is \d+× smaller than the surface's size .* same length unit\? mesh\.scale converts/);
    expect(w.warnings.join('\n')).not.toMatch(/spans only/); // not a resolution to fix
    expect(w.mesh).toMatchObject({ scale: 1000, units: 'µm' });
    // γ scaled by 1/1000² with the lengths: the same pattern in µm, no warning, and units in the printout
    const right = temp.write('um-right.yaml', 'mesh: {shape: sphere, vertices: 2000, scale: 1000, units: µm}\nkinetics: {model: schnakenberg, parameters: {gamma: 0.0002}}\ntime: {end: 1}\n');
    expect(JSON.parse((await run('run', right, '--check')).out).warnings).toEqual([]);
    const s = await run('stability', right);
    expect(s.out).toMatch(/unstable band 4\.0000e-5 < k² < 1\.0000e-4 µm⁻²; fastest k² = [0-9.e-]+ µm⁻² \(wavelength [0-9.]+ µm\)/);
    expect(s.out).toMatch(/area [0-9.e+]+ µm²/);
  }, 60_000);
});

describe('a scan-like mesh (the scan-bud shape: marching tetrahedra on a smoothed voxel mask)', () => {
  it('is closed, welded and outward, but sliver-rich: the warnings name the worst triangles; its intrinsic Delaunay weights are all nonnegative', async () => {
    const m = await run('mesh', 'scan-bud', '--vertices', '6000', '--json');
    expect(m.code, m.err).toBe(0);
    const j = JSON.parse(m.out);
    expect(j.errors).toEqual([]);
    expect([j.genus, j.boundaryLoops, j.components]).toEqual([0, 0, 1]);
    expect(j.quality.slivers).toBeGreaterThan(50);
    expect(j.quality.explicitStepRatio).toBeLessThan(0.02);
    const worst = j.quality.worst[0];
    expect(j.warnings.join('\n')).toContain(`the worst: triangle ${worst.triangle} (vertices ${worst.vertices.join(', ')}`);
    const { buildShape } = await import('../../meshes/shapes/index.ts');
    const { intrinsicDelaunayOperators } = await import('../../solver/fem/intrinsicDelaunay.ts');
    const { cotanStiffness } = await import('../../solver/fem/cotanStiffness.ts');
    const mesh = buildShape({ shape: 'scan-bud', vertices: 6000 }).mesh;
    const positive = (K: ReturnType<typeof cotanStiffness>) => { let c = 0; for (let i = 0; i < K.rows; i++) for (let q = K.rowOffsets[i]; q < K.rowOffsets[i + 1]; q++) if (K.columns[q] !== i && K.values[q] > 1e-12) c++; return c; };
    expect(positive(cotanStiffness(mesh))).toBeGreaterThan(100);
    expect(positive(intrinsicDelaunayOperators(mesh).stiffness)).toBe(0); // closed: every edge interior
  }, 60_000);
});
