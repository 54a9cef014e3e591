import { Command, CommanderError, Option } from 'commander';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { SHAPES, DEFAULT_SHAPE_VERTICES } from '../../meshes/shapes/index.ts';
import { meshStatistics } from '../mesh/meshStatistics.ts';
import { saveMeshFile } from '../io/meshFiles.ts';
import { saveModeFile } from './saveModeFile.ts';
import { laplaceBeltramiEigenpairs, type MassKind } from '../fem/laplaceBeltramiEigenpairs.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { resolveMesh, requireFemReady, parseCount, type MeshSourceOptions } from './meshSource.ts';
import { UsageError } from '../UsageError.ts';
import { runDemo } from './demo.ts';
import { VERSION } from '../version.ts';
import { MODELS } from '../kinetics/models/index.ts';
import { runScenarioFile, resumeRun, checkScenario } from '../run/runScenarioFile.ts';
import { runStability } from './stability.ts';
import { exportRun, type ExportFormat } from './exportRun.ts';
import { runFigure } from './figure.ts';
import { VIEW_PRESETS } from '../io/surfaceView.ts';
import { planSweep, SWEEP_FILES } from '../sweep/sweepPlan.ts';
import { RUN_FILES } from '../run/runFiles.ts';
import { runSweepTask, sweepStatus } from '../sweep/sweepTask.ts';
import { runSweepLocal } from '../sweep/sweepPool.ts';
import { writeSlurmArray } from '../sweep/sweepSlurm.ts';
import { collectSweep } from '../sweep/sweepCollect.ts';
import { startViewServer } from './viewServer.ts';
import { ensureViewerBuilt } from './viewerBuild.ts';
import { existsSync, statSync } from 'node:fs';

const collect = (value: string, previous: string[] = []) => previous.concat([value]);

function addMeshOptions(cmd: Command): Command {
  return cmd
    .option('-p, --param <name=value>', 'shape parameter (repeat for several); see `placode shapes`', collect)
    .option('--vertices <n>', `target vertex count of a built-in shape (default ${DEFAULT_SHAPE_VERTICES})`)
    .option('--weld [tolerance]', 'merge vertices closer than tolerance (default: identical ones)')
    .option('--fix-orientation', 'make triangle orientation consistent (outward on closed surfaces)')
    .option('--drop-unreferenced', 'remove vertices no triangle uses')
    .option('--refine <n>', '1-to-4 midpoint refinements to apply')
    .option('--loop <n>', 'Loop subdivision steps to apply (smooths the surface)');
}

function log(quiet: boolean | undefined, text: string) {
  if (!quiet) process.stderr.write(text + '\n');
}

/** Run the command line; returns the exit code. Never throws. */
export async function main(argv: string[]): Promise<number> {
  const program = new Command('placode')
    .description('Turing-type reaction–diffusion on tissue-shaped surfaces, fixed or growing: meshes, surface finite elements, eigenmodes, stability, runs')
    .version(VERSION)
    .exitOverride()
    .configureOutput({ writeErr: (s) => process.stderr.write(s) })
    .showHelpAfterError('(run with --help for usage)');
  let exitCode = 0;

  program
    .command('shapes')
    .description('list the built-in shapes and their parameters')
    .option('--json', 'print as JSON')
    .action((o: { json?: boolean }) => {
      if (o.json) {
        process.stdout.write(JSON.stringify(SHAPES, (k, v) => (k === 'build' || k === 'check' ? undefined : v), 2) + '\n');
        return;
      }
      for (const s of Object.values(SHAPES)) {
        process.stdout.write(`${s.name}  (${s.closed ? 'closed' : 'open'}) — ${s.description}\n`);
        for (const [k, p] of Object.entries(s.parameters)) {
          process.stdout.write(`    ${k.padEnd(16)} default ${String(p.default).padEnd(6)} ${p.description}\n`);
        }
      }
    });

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
    .action((spec: string, o: MeshSourceOptions & { out?: string; ascii?: boolean; force?: boolean; json?: boolean }) => {
      const r = resolveMesh(spec, o);
      const stats = meshStatistics(r.mesh);
      if (o.out) {
        if (stats.errors.length > 0) throw new UsageError(`not writing ${o.out}: the mesh has errors:\n  - ${stats.errors.join('\n  - ')}`);
        saveMeshFile(o.out, r.mesh, { encoding: o.ascii ? 'ascii' : 'binary', force: o.force, properties: r.vertexData, comments: [`placode ${VERSION}`] });
      }
      if (o.json) {
        process.stdout.write(JSON.stringify(stats, null, 2) + '\n');
      } else {
        const e = stats.edgeLength;
        process.stdout.write(
          `${spec}: ${stats.vertices} vertices, ${stats.triangles} triangles\n` +
            `  area ${fmt(stats.area)}, genus ${stats.genus}, ${stats.boundaryLoops} boundary loop(s), ${stats.components} component(s), Euler characteristic ${stats.eulerCharacteristic}\n` +
            `  edge length min ${fmt(e.min)} mean ${fmt(e.mean)} max ${fmt(e.max)}\n`,
        );
        for (const n of r.notes) process.stdout.write(`  note: ${n}\n`);
        for (const w of stats.warnings) process.stdout.write(`  warning: ${w}\n`);
        for (const w of stats.errors) process.stdout.write(`  error: ${w}\n`);
        if (o.out) process.stdout.write(`  wrote ${o.out}\n`);
      }
      if (stats.errors.length > 0) exitCode = 1;
    });

  addMeshOptions(
    program
      .command('modes')
      .argument('<shape|file>', 'built-in shape name or mesh file')
      .description('lowest Laplace–Beltrami eigenvalues (K φ = λ M φ) and, on request, painted eigenmodes'),
  )
    .option('-n, --count <n>', 'number of eigenpairs', '20')
    .addOption(new Option('--mass <kind>', 'mass matrix').choices(['consistent', 'lumped']).default('consistent'))
    .option('--paint <indices>', 'comma-separated mode indices (0 = constant mode) to write as painted PLY files')
    .option('--out-dir <dir>', 'directory for painted modes', 'modes')
    .option('--cluster-tol <rel>', 'relative gap under which eigenvalues count as one multiple eigenvalue', '0.01')
    .option('--force', 'overwrite existing files')
    .option('--json', 'print {"eigenvalues": [...], "area": A, "vertices": n, ...} as JSON')
    .option('-q, --quiet', 'no progress messages')
    .action((spec: string, o: MeshSourceOptions & { count: string; mass: MassKind; paint?: string; outDir: string; clusterTol: string; force?: boolean; json?: boolean; quiet?: boolean }) => {
      const count = parseCount(o.count, '--count', 1)!;
      const clusterTolerance = Number(o.clusterTol);
      if (!(clusterTolerance >= 0)) throw new UsageError(`--cluster-tol must be a number ≥ 0, got "${o.clusterTol}"`);
      const paint = o.paint ? o.paint.split(',').map((s) => parseCount(s.trim(), '--paint index')!) : [];
      for (const k of paint) if (k >= count) throw new UsageError(`--paint index ${k} is not below --count ${count}`);
      const r = resolveMesh(spec, o);
      const warnings = requireFemReady(r.mesh, spec);
      for (const w of warnings) log(o.quiet, `warning: ${w}`);
      const n = r.mesh.positions.length / 3;
      log(o.quiet, `computing ${count} eigenpairs on ${n} vertices (${o.mass} mass)…`);
      const t0 = performance.now();
      let last = -1;
      const eig = laplaceBeltramiEigenpairs(r.mesh, {
        count, mass: o.mass, clusterTolerance,
        onProgress: (done, wanted) => {
          if (done !== last) { last = done; log(o.quiet, `  ${done}/${wanted} converged`); }
        },
      });
      const seconds = (performance.now() - t0) / 1000;
      const area = meshArea(r.mesh);
      const written: string[] = [];
      if (paint.length > 0) {
        mkdirSync(o.outDir, { recursive: true });
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
          mass: o.mass, method: eig.method, seconds, files: written,
        }, null, 2) + '\n');
      } else {
        process.stdout.write(`${spec}: ${n} vertices, area ${fmt(area)}, ${o.mass} mass, ${eig.method} solver, ${seconds.toFixed(2)} s\n`);
        process.stdout.write('  index  eigenvalue      multiplicity\n');
        for (const c of eig.clusters) {
          process.stdout.write(`  ${String(c.first).padStart(5)}  ${fmt(c.mean).padEnd(14)}  ${c.size}\n`);
        }
        for (const f of written) process.stdout.write(`  wrote ${f}\n`);
      }
    });

  program
    .command('demo')
    .description('the built-in demonstration: a limb-bud paddle, its first eigenmodes, then a pattern forming while it grows')
    .option('--out-dir <dir>', 'where to write the outputs', 'placode-demo')
    .action(async (o: { outDir: string }) => {
      await runDemo(o.outDir);
    });

  program
    .command('models')
    .description('list the built-in kinetics with their equations, parameters and sources')
    .option('--json', 'print as JSON')
    .action((o: { json?: boolean }) => {
      if (o.json) {
        process.stdout.write(JSON.stringify(Object.values(MODELS), null, 2) + '\n'); // steadyStates functions drop out
        return;
      }
      for (const m of Object.values(MODELS)) {
        process.stdout.write(`${m.name} — ${m.title}: ${m.description}\n`);
        for (const s of m.species) process.stdout.write(`    d${s}/dt = ${m.reactions[s]}   + ∇·(${m.diffusion[s]} ∇${s})\n`);
        for (const [k, p] of Object.entries(m.parameters)) process.stdout.write(`    ${k.padEnd(8)} default ${String(p.default).padEnd(8)} ${p.description}\n`);
        process.stdout.write(`    source: ${m.citation}\n`);
      }
    });

  program
    .command('stability')
    .argument('<scenario>', 'scenario file whose kinetics, parameters, diffusion and mesh are analysed')
    .description('linear stability: steady states, Turing conditions, unstable band, and the surface modes it predicts')
    .option('--json', 'print the analysis as JSON')
    .option('--paint <file>', 'write the predicted mode as a painted PLY file')
    .option('--max-modes <n>', 'most surface eigenpairs to compute', '200')
    .option('--state <i>', 'which homogeneous steady state to analyse (default: the scenario\'s initial.steadyState, else 0)')
    .option('--map <name=from:to:steps>', 'a parameter axis of a stability map (give two)', collect)
    .option('--map-out <prefix>', 'write the map as PREFIX.csv and PREFIX.svg')
    .option('--force', 'overwrite existing output files')
    .action((file: string, o: { json?: boolean; paint?: string; maxModes: string; state?: string; map?: string[]; mapOut?: string; force?: boolean }) => {
      runStability(file, {
        json: o.json, paint: o.paint, map: o.map, mapOut: o.mapOut, force: o.force,
        maxModes: parseCount(o.maxModes, '--max-modes', 2), state: parseCount(o.state, '--state'),
      }, (s) => process.stdout.write(s));
    });

  program
    .command('export')
    .argument('<input>', 'a run directory or one frame file (.ply)')
    .description('export frames as PLY, binary glTF, OBJ with vertex colours, or CSV')
    .addOption(new Option('--format <f>', 'output format').choices(['ply', 'glb', 'obj', 'csv']).default('ply'))
    .requiredOption('-o, --out <path>', 'output file (one frame) or directory (with --all)')
    .option('--frame <n>', 'frame index of a run (default: the final state)')
    .option('--all', 'every frame of the run (and final), into the --out directory')
    .option('--species <name>', 'species painted as colours (default: the last one)')
    .option('--colormap <name>', 'colormap (viridis magma inferno plasma cividis diverging greys)', 'viridis')
    .option('--range <r>', 'colour range: frame, run, or min:max', 'frame')
    .option('--ascii', 'ASCII PLY instead of binary')
    .option('--animate', 'glb: one file whose animation plays every frame (growth and colours)')
    .option('--duration <s>', 'seconds of playback for --animate', '10')
    .option('--force', 'overwrite existing files')
    .action(async (input: string, o: { format: ExportFormat; out: string; frame?: string; all?: boolean; species?: string; colormap: string; range: string; ascii?: boolean; animate?: boolean; duration: string; force?: boolean }) => {
      const duration = Number(o.duration);
      if (!(duration > 0)) throw new UsageError(`--duration must be a positive number of seconds, got "${o.duration}"`);
      const files = await exportRun(input, { ...o, frame: parseCount(o.frame, '--frame'), duration });
      for (const f of files) process.stdout.write(`wrote ${f}\n`);
    });

  program
    .command('figure')
    .argument('<input>', 'a run directory or one frame file (.ply)')
    .description('render the coloured surface as a PNG or SVG figure with a colour bar (no GPU)')
    .requiredOption('-o, --out <file>', 'figure file, .png or .svg')
    .option('--frame <n>', 'frame index of a run (default: the final state)')
    .option('--sheet', 'every frame of the run in a grid, captioned with its time')
    .option('--species <name>', 'species to paint (default: the last one)')
    .option('--colormap <name>', 'colormap', 'viridis')
    .option('--range <r>', 'colour range: min:max, or run (over every frame of the run); default: over the frames shown')
    .option('--view <v>', `view preset (${Object.keys(VIEW_PRESETS).join(', ')}) or azimuth,elevation`, 'iso')
    .option('--title <text>', 'title above the figure')
    .option('--width <px>', 'width in pixels', '900')
    .option('--height <px>', 'height in pixels', '700')
    .option('--dpi <n>', 'resolution recorded in a PNG', '150')
    .option('--force', 'overwrite an existing file')
    .action((input: string, o: { out: string; frame?: string; sheet?: boolean; species?: string; colormap: string; range?: string; view: string; title?: string; width: string; height: string; dpi: string; force?: boolean }) => {
      const file = runFigure(input, {
        ...o, frame: parseCount(o.frame, '--frame'),
        width: parseCount(o.width, '--width', 1)!, height: parseCount(o.height, '--height', 1)!, dpi: parseCount(o.dpi, '--dpi', 1)!,
      });
      process.stdout.write(`wrote ${file}\n`);
    });

  program
    .command('run')
    .argument('[scenario]', 'scenario file (.yaml, .yml or .json)')
    .description('run a scenario headless and write its outputs into a run directory')
    .option('-o, --out <dir>', 'run directory to write (record.json, frames/, final.ply, metrics.csv, state.bin)')
    .option('--resume <dir>', 'continue an interrupted run from its saved state')
    .option('--force', 'replace an existing run directory')
    .option('--check', 'check the scenario and print the resolved plan without running')
    .addOption(new Option('--progress <mode>', 'progress display').choices(['auto', 'bar', 'lines', 'none']).default('auto'))
    .action(async (file: string | undefined, o: { out?: string; resume?: string; force?: boolean; check?: boolean; progress: 'auto' | 'bar' | 'lines' | 'none' }) => {
      let outcome;
      if (o.resume) {
        if (file || o.out) throw new UsageError('--resume DIR continues a run as it was set up: give no scenario or --out with it');
        outcome = await resumeRun(o.resume, { progress: o.progress, command: argv });
      } else {
        if (!file) throw new UsageError('give a scenario file (placode run scenario.yaml --out DIR) or --resume DIR');
        if (o.check) {
          const plan = checkScenario(file);
          process.stdout.write(JSON.stringify(plan, null, 2) + '\n');
          return;
        }
        outcome = await runScenarioFile(file, { out: o.out, force: o.force, progress: o.progress, command: argv });
      }
      exitCode = outcome.reason === 'blow-up' || outcome.reason === 'degenerate' ? 3 : outcome.reason === 'interrupted' ? 130 : 0;
    });

  program
    .command('view')
    .argument('[rundir]', 'a run directory to open on the timeline')
    .description('the viewer: a web page on 127.0.0.1 to set up, run, brush, analyse and export in the browser')
    .option('--port <n>', 'port on 127.0.0.1 (0: any free one)', '5178')
    .option('--rebuild', 'build the page again even if it looks current')
    .action(async (rundir: string | undefined, o: { port: string; rebuild?: boolean }) => {
      if (rundir && (!existsSync(rundir) || !statSync(rundir).isDirectory())) throw new UsageError(`${rundir} is not a directory: give a run directory written by placode run`);
      if (rundir && !existsSync(join(rundir, RUN_FILES.record))) {
        throw new UsageError(existsSync(join(rundir, SWEEP_FILES.manifest))
          ? `${rundir} is a sweep: view one of its runs (placode view ${rundir}/runs/ID; placode sweep status ${rundir} --list done lists them), or its contact sheet from placode sweep collect`
          : `${rundir} is not a run directory (no ${RUN_FILES.record})`);
      }
      const appDir = await ensureViewerBuilt((s) => process.stderr.write(s + '\n'), o.rebuild);
      const { url } = await startViewServer({ appDir, runDir: rundir, port: parseCount(o.port, '--port') });
      process.stdout.write(`Placode viewer at ${url}${rundir ? ` (run ${rundir})` : ''} — open it in a browser; Ctrl-C stops it\n`);
      await new Promise<void>((done) => {
        const stop = () => { process.off('SIGINT', stop); process.off('SIGTERM', stop); done(); };
        process.on('SIGINT', stop);
        process.on('SIGTERM', stop);
      });
    });

  const sweep = program
    .command('sweep')
    .description('parameter sweeps: plan a manifest of runs, run it on every core or as a Slurm job array, follow it, collect the results');
  sweep
    .command('plan')
    .argument('<sweep>', 'a sweep file (scenario: + vary:) or a scenario with a sweep: section')
    .description('expand a sweep into DIR/manifest.jsonl (one run per line) and a scenario per run')
    .requiredOption('-o, --out <dir>', 'sweep directory')
    .option('--force', 'plan again into a directory that holds a sweep (finished runs with unchanged scenarios are kept)')
    .action((file: string, o: { out: string; force?: boolean }) => {
      const { entries, plan } = planSweep(file, o);
      process.stdout.write(`planned ${entries.length} runs (${plan.design}${plan.duplicatesDropped ? `, ${plan.duplicatesDropped} duplicate points dropped` : ''}) in ${o.out}\n`);
      process.stdout.write(`  run them here:      placode sweep run ${o.out}\n  or on Slurm:        placode sweep slurm ${o.out} --submit\n`);
    });
  sweep
    .command('run')
    .argument('<dir>', 'a planned sweep directory')
    .description('run every unfinished run of a sweep on a pool of worker threads; finished runs are skipped')
    .option('-w, --workers <n>', 'worker threads (default: every core)')
    .option('--retry-failed', 'run failed runs again')
    .addOption(new Option('--progress <mode>', 'progress display').choices(['auto', 'bar', 'lines', 'none']).default('auto'))
    .action(async (dir: string, o: { workers?: string; retryFailed?: boolean; progress: 'auto' | 'bar' | 'lines' | 'none' }) => {
      const r = await runSweepLocal(dir, { workers: parseCount(o.workers, '--workers', 1), retryFailed: o.retryFailed, progress: o.progress });
      process.stdout.write(`${r.done} done, ${r.failed.length} failed, ${r.skipped} already finished, ${r.unfinished} unfinished of ${r.total} runs in ${r.seconds.toFixed(1)} s on ${r.workers} worker(s)\n`);
      for (const f of r.failed) process.stdout.write(`  failed: run ${f.index} (${f.id}): ${f.message.split('\n')[0]}\n`);
      if (r.interrupted) {
        process.stdout.write(`interrupted; continue with: placode sweep run ${dir}\n`);
        exitCode = 130;
      } else if (r.failed.length) exitCode = 1;
    });
  sweep
    .command('task')
    .argument('<dir>', 'a planned sweep directory')
    .description('run one entry of a sweep (what each Slurm array task runs)')
    .requiredOption('--index <i>', 'manifest index (the Slurm array task id)')
    .option('--retry-failed', 'run it again if it failed before')
    .action(async (dir: string, o: { index: string; retryFailed?: boolean }) => {
      let stop = false;
      const onSignal = () => { stop = true; };
      process.on('SIGTERM', onSignal);
      try {
        const r = await runSweepTask(dir, parseCount(o.index, '--index')!, { retryFailed: o.retryFailed, log: (s) => process.stderr.write(s + '\n'), shouldStop: () => stop });
        process.stdout.write(`run ${r.index} (${r.id}): ${r.skipped ? `already ${r.state}` : r.state}: ${r.message.split('\n')[0]}\n`);
        exitCode = r.state === 'done' ? 0 : r.state === 'failed' ? 1 : 130;
      } finally {
        process.off('SIGTERM', onSignal);
      }
    });
  sweep
    .command('status')
    .argument('<dir>', 'a planned sweep directory')
    .description('how many runs are done, failed, running, interrupted and pending (read from the run directories)')
    .option('--json', 'every run with its state, as JSON')
    .option('--list <state>', 'list the runs in one state')
    .action((dir: string, o: { json?: boolean; list?: string }) => {
      const s = sweepStatus(dir);
      if (o.json) {
        process.stdout.write(JSON.stringify({ counts: s.counts, runs: s.runs.map((r) => ({ index: r.index, id: r.id, label: r.label, state: r.state, message: r.message })) }, null, 2) + '\n');
        return;
      }
      const total = s.runs.length;
      process.stdout.write(`${dir}: ${total} runs — ${Object.entries(s.counts).map(([k, v]) => `${v} ${k}`).join(', ')}\n`);
      if (o.list) {
        if (!(o.list in s.counts)) throw new UsageError(`--list ${o.list}: one of ${Object.keys(s.counts).join(', ')}`);
        for (const r of s.runs) if (r.state === o.list) process.stdout.write(`  ${String(r.index).padStart(5)}  ${r.id}  ${r.label}${r.message ? `  — ${r.message.split('\n')[0]}` : ''}\n`);
      } else {
        for (const r of s.runs) if (r.state === 'failed') process.stdout.write(`  failed ${r.index} (${r.label}): ${(r.message ?? '').split('\n')[0]}\n`);
      }
    });
  sweep
    .command('slurm')
    .argument('<dir>', 'a planned sweep directory')
    .description('write a Slurm job array (one task per unfinished run) to DIR/slurm/array.sbatch, and submit it with --submit')
    .option('--partition <p>', 'Slurm partition')
    .option('--time <t>', 'wall time per run (minutes, HH:MM:SS or D-HH:MM:SS)')
    .option('--mem <m>', 'memory per run (e.g. 2G)')
    .option('--max-parallel <k>', 'most runs at once')
    .option('--all', 'every run, finished or not')
    .option('--retry-failed', 'include failed runs and run them again')
    .option('--launcher <command>', 'how compute nodes start placode (default: this node and placode by absolute path)')
    .option('--max-array-size <n>', "the cluster's MaxArraySize (default: from scontrol, else 1001); larger sweeps get several arrays")
    .option('--submit', 'submit with sbatch')
    .action((dir: string, o: { partition?: string; time?: string; mem?: string; maxParallel?: string; all?: boolean; retryFailed?: boolean; launcher?: string; maxArraySize?: string; submit?: boolean }) => {
      const r = writeSlurmArray(dir, { ...o, maxParallel: parseCount(o.maxParallel, '--max-parallel', 1), maxArraySize: parseCount(o.maxArraySize, '--max-array-size', 1) });
      process.stdout.write(`wrote ${r.scripts.join(', ')} (${r.indices.length} array tasks)\n`);
      if (r.jobIds.length) process.stdout.write(`submitted job${r.jobIds.length > 1 ? 's' : ''} ${r.jobIds.join(', ')}; follow with: placode sweep status ${dir}\n`);
      else process.stdout.write(`submit with: ${r.scripts.map((f) => `sbatch ${f}`).join(' && ')}\n`);
    });
  sweep
    .command('collect')
    .argument('<dir>', 'a planned sweep directory')
    .description('gather every run\'s final metrics and stability summary into one CSV, and a contact sheet of the patterns on the parameter grid')
    .option('--csv <file>', 'CSV file (default DIR/sweep.csv)')
    .option('--sheet <file>', 'contact sheet PNG (default DIR/sheet.png)')
    .option('--no-sheet', 'no contact sheet')
    .option('--species <name>', 'species painted on the sheet (default: the analysed one)')
    .option('--colormap <name>', 'colormap', 'viridis')
    .option('--range <r>', 'colour range min:max (default: over every run shown)')
    .option('--view <v>', `view preset (${Object.keys(VIEW_PRESETS).join(', ')})`, 'iso')
    .option('--thumbnail <px>', 'width of each thumbnail', '220')
    .action((dir: string, o: { csv?: string; sheet?: string | boolean; species?: string; colormap: string; range?: string; view: string; thumbnail: string }) => {
      const r = collectSweep(dir, { ...o, sheet: o.sheet === true ? undefined : o.sheet, thumbnail: parseCount(o.thumbnail, '--thumbnail', 40) });
      process.stdout.write(`wrote ${r.csv} (${r.rows} runs${r.missing ? `, ${r.missing} not finished` : ''})\n`);
      if (r.sheet) process.stdout.write(`wrote ${r.sheet}\n`);
    });

  try {
    await program.parseAsync(argv, { from: 'user' });
    return exitCode;
  } catch (e) {
    if (e instanceof CommanderError) {
      return e.exitCode === 0 || e.code === 'commander.helpDisplayed' || e.code === 'commander.version' ? 0 : 2;
    }
    const err = e as Error;
    const cmd = argv.find((a) => !a.startsWith('-')) ?? '';
    process.stderr.write(`placode${cmd ? ' ' + cmd : ''}: ${err.message}\n`);
    if (process.env.PLACODE_DEBUG) process.stderr.write(`${err.stack}\n`);
    return e instanceof UsageError ? 2 : 1;
  }
}

function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Math.abs(x) >= 1e4 || (Math.abs(x) < 1e-3 && x !== 0) ? x.toExponential(4) : x.toPrecision(6);
}
