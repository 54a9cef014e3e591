import { mkdtempSync, rmSync, writeFileSync, readFileSync } from 'node:fs';
import { Worker } from 'node:worker_threads';
import { tmpdir, availableParallelism } from 'node:os';
import { join } from 'node:path';
import { planSweep } from '../../solver/sweep/sweepPlan.ts';
import { runSweepLocal } from '../../solver/sweep/sweepPool.ts';

/** Seconds for `threads` worker threads each running the same CPU-bound loop: the machine's own ceiling on parallel speed-up. */
async function busyThreads(threads: number): Promise<number> {
  const code = `let x = 0; for (let i = 0; i < 3e8; i++) x += Math.sqrt(i); require('node:worker_threads').parentPort.postMessage(x);`;
  const t0 = performance.now();
  await Promise.all(Array.from({ length: threads }, () => new Promise((done) => new Worker(code, { eval: true }).once('message', done))));
  return (performance.now() - t0) / 1000;
}

/**
 * The local sweep pool's speed-up: the same 8-run sweep (Gray–Scott, explicit,
 * 10000 vertices, t = 20000 each) on 1 worker and on every core, and whether
 * both give byte-identical results.
 */
export async function sweepPoolBench(): Promise<void> {
  const dir = mkdtempSync(join(tmpdir(), 'placode-bench-sweep-'));
  try {
    writeFileSync(join(dir, 'base.yaml'), `
seed: 1
mesh: {shape: sphere, params: {radius: 0.25}, vertices: 10000}
kinetics: {model: gray-scott, parameters: {F: 0.03, k: 0.062}}
initial: {spots: {count: 4, radius: 0.03, values: {u: 0.5, v: 0.25}}}
time: {scheme: explicit, end: 20000}
output: {every: 5000}
analysis: {modes: 0}
`);
    writeFileSync(join(dir, 'sweep.yaml'), 'scenario: base.yaml\nvary:\n  kinetics.parameters.F: [0.026, 0.03, 0.034, 0.038]\n  kinetics.parameters.k: [0.058, 0.062]\n');
    const cores = availableParallelism();
    const busy1 = await busyThreads(1), busyN = await busyThreads(cores);
    const seconds: Record<number, number> = {};
    for (const workers of [1, cores]) {
      const out = join(dir, `w${workers}`);
      planSweep(join(dir, 'sweep.yaml'), { out, log: () => {} });
      const r = await runSweepLocal(out, { workers, progress: 'none', log: () => {} });
      seconds[workers] = r.seconds;
    }
    const { entries } = planSweep(join(dir, 'sweep.yaml'), { out: join(dir, 'w1'), force: true, log: () => {} });
    const same = entries.every((e) => readFileSync(join(dir, 'w1', e.run, 'state.bin')).equals(readFileSync(join(dir, `w${cores}`, e.run, 'state.bin'))));
    console.log('\nLocal sweep pool: 8 runs of Gray–Scott on 10000 vertices to t = 20000 (explicit) each');
    console.log('| workers | seconds | speed-up | results identical to 1 worker |');
    console.log('|---:|---:|---:|---|');
    console.log(`| 1 | ${seconds[1].toFixed(1)} | 1.00× | — |`);
    if (cores > 1) console.log(`| ${cores} | ${seconds[cores].toFixed(1)} | ${(seconds[1] / seconds[cores]).toFixed(2)}× | ${same ? 'yes' : 'NO'} |`);
    // the same loop on every core takes as long as on one when the cores are really separate
    console.log(`Machine ceiling: ${cores} threads of a CPU-bound loop do ${cores} loops at ${((cores * busy1) / busyN).toFixed(2)}× the rate of one thread (ideal ${cores}×).`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
