/**
 * Placode as a library in Node: mesh files on disk, scenario files, run
 * directories (start, resume, read), exports and figures of runs, and
 * parameter sweeps — what the command line does, as functions.
 *
 *   import { runScenarioFile } from 'placode/node';
 */
export { loadMeshFile, saveMeshFile, writeFileAtomic } from './io/meshFiles.ts';
export { nodeScenarioEnvironment } from './scenario/nodeScenarioEnvironment.ts';
export { loadScenarioFile, checkScenario, runScenarioFile, resumeRun, type RunOptions, type RunOutcome } from './run/runScenarioFile.ts';
export { readRunRecord, peekRunRecord, loadRunState } from './run/runDirectory.ts';
export { runFrames, loadSnapshot, snapshotField } from './run/runFrames.ts';
export { RUN_FILES } from './run/runFiles.ts';
export { meshChecksum } from './run/meshChecksum.ts';
export { nodeThreadTeam, machineThreads } from './run/nodeThreads.ts';
export { exportRun, type ExportOptions } from './cli/exportRun.ts';
export { runFigure, type FigureOptions } from './cli/figure.ts';
export { surfaceFigurePng } from './io/surfaceFigurePng.ts';
export { svgToPng } from './io/svgToPng.ts';
export { runPainting } from './run/runPainting.ts';
export { planSweep, readManifest, type SweepPlan } from './sweep/sweepPlan.ts';
export { SWEEP_FILES, type ManifestEntry } from './sweep/sweepFiles.ts';
export { runSweepLocal, type PoolOptions, type PoolOutcome } from './sweep/sweepPool.ts';
export { runSweepTask, sweepStatus } from './sweep/sweepTask.ts';
export { writeSlurmArray } from './sweep/sweepSlurm.ts';
export { collectSweep } from './sweep/sweepCollect.ts';
export { UsageError } from './UsageError.ts';
export { VERSION } from './version.ts';
