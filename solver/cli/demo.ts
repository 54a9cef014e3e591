import { ensureDirectory } from '../io/fileAccess.ts';
import { UsageError } from '../UsageError.ts';
import { join, resolve } from 'node:path';
import { buildShape } from '../../meshes/shapes/index.ts';
import { meshStatistics } from '../mesh/meshStatistics.ts';
import { saveMeshFile } from '../io/meshFiles.ts';
import { saveModeFile } from './saveModeFile.ts';
import { laplaceBeltramiEigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { runScenarioFile } from '../run/runScenarioFile.ts';
import { runFigure } from './figure.ts';
import { loadMeshFile } from '../io/meshFiles.ts';
import { speciesFromProperties, RUN_FILES } from '../run/runFiles.ts';
import { readRunRecord } from '../run/runDirectory.ts';
import { thresholdComponents } from '../analysis/thresholdComponents.ts';
import { packageFile } from '../packageRoot.ts';

/** The example scenario the demo runs. */
export const DEMO_SCENARIO = packageFile('meshes/examples/limb-paddle-growing.yaml');

/**
 * The built-in demonstration: an imagined organism's limb-bud paddle, its mesh
 * statistics and the lowest Laplace–Beltrami eigenmodes — the patterns a Turing
 * mechanism on this shape can select first — then the growing-paddle example
 * (Gierer–Meinhardt with a distal gradient while the paddle elongates).
 */
export async function runDemo(outDir: string): Promise<void> {
  const say = (s: string) => process.stdout.write(s + '\n');
  ensureDirectory(outDir, (m) => new UsageError(m));
  say('Placode demo: a limb-bud paddle (length 3, stalk radius 0.5, paddle 2.0 × 0.6)');
  const t0 = performance.now();
  const { mesh, params } = buildShape({ shape: 'limb-bud', vertices: 12_000 });
  const stats = meshStatistics(mesh);
  say(`  mesh: ${stats.vertices} vertices, ${stats.triangles} triangles, area ${stats.area.toFixed(4)}, ` +
    `${stats.boundaryLoops} open boundary (the base), genus ${stats.genus}, built in ${(performance.now() - t0).toFixed(0)} ms`);
  const meshFile = join(outDir, 'limb-bud.ply');
  saveMeshFile(meshFile, mesh, { force: true, comments: [`limb-bud ${JSON.stringify(params)}`] });
  const t1 = performance.now();
  const count = 16;
  const eig = laplaceBeltramiEigenpairs(mesh, { count });
  say(`  lowest ${count} Laplace–Beltrami eigenvalues (no-flux base), ${((performance.now() - t1) / 1000).toFixed(2)} s:`);
  say('    ' + Array.from(eig.values).map((v) => v.toFixed(3)).join('  '));
  say('  Each eigenvalue λ is a wavelength 2π/√λ that fits this shape; a Turing mechanism whose');
  say('  unstable band contains λ can grow that mode first.');
  const files: string[] = [];
  for (let k = 1; k <= 6; k++) {
    const file = join(outDir, `mode-${String(k).padStart(3, '0')}.ply`);
    saveModeFile(file, mesh, eig.vectors[k], { force: true });
    files.push(file);
  }
  say(`  wrote ${meshFile} and painted modes 1–6 (${files.map((f) => f.split('/').pop()).join(', ')})`);
  say('');
  say('Reaction–diffusion on the growing paddle: meshes/examples/limb-paddle-growing.yaml (Gierer–Meinhardt,');
  say('activator production rising towards the tip, the paddle lengthening 60 %). Frames: placode-demo/paddle-run/frames/.');
  const runDir = join(outDir, 'paddle-run');
  const outcome = await runScenarioFile(DEMO_SCENARIO, { out: runDir, force: true, progress: 'auto', command: ['demo'] });
  const final = loadMeshFile(join(runDir, RUN_FILES.final));
  const u = speciesFromProperties(final.vertexData).u;
  const patches = thresholdComponents(final.mesh, u).patches;
  const record = readRunRecord(runDir);
  const counts = record.analysis.frames.map((f) => f.patches.length);
  say(`  activator spots along the run: ${counts.slice(1).join(' → ')}; at t=${outcome.time} ${patches.length} patches above the mid-range`);
  const inserted = record.analysis.events.filter((e) => e.kind === 'insertion' || e.kind === 'split').length;
  say(`  ${inserted} spot insertions or splits while the paddle grew (record.json → analysis.events)`);
  const figure = runFigure(runDir, { out: join(outDir, 'paddle-sheet.png'), sheet: true, species: 'u', colormap: 'magma', view: 'top', title: 'Growing limb-bud paddle: activator u', width: 1400, height: 1000, dpi: 150, force: true });
  say(`  figure of every frame: ${figure}`);
  say(`  outputs are in ${resolve(outDir)} (open the .ply files in any mesh viewer; colours show u)`);
  say(`  watch the run grow in the browser: npx placode view ${join(outDir, 'paddle-run')}`);
}
