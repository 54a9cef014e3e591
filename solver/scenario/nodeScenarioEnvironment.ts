import { existsSync, readFileSync, statSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join, resolve, dirname } from 'node:path';
import type { Mesh } from '../mesh/Mesh.ts';
import { loadMeshFile } from '../io/meshFiles.ts';
import type { MeshSpec } from './Scenario.ts';
import type { LoadedMesh, ScenarioEnvironment } from './resolveScenario.ts';
import { RUN_FILES, decodeState } from '../run/runFiles.ts';
import { loadSnapshot } from '../run/runFrames.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { scenarioMesh } from './scenarioMesh.ts';

/** sha256 of a mesh's positions and triangles, as stored (for records and resume checks). */
export function meshChecksum(mesh: Mesh): string {
  const h = createHash('sha256');
  h.update(new Uint8Array(mesh.positions.buffer, mesh.positions.byteOffset, mesh.positions.byteLength));
  h.update(new Uint8Array(mesh.triangles.buffer, mesh.triangles.byteOffset, mesh.triangles.byteLength));
  return `sha256:${h.digest('hex')}`;
}

/** Read a previous run's last state: full precision from state.bin, else the float properties of final.ply. */
export function loadRunState(dir: string): { species: string[]; values: Record<string, Float64Array> } {
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new Error(`"${dir}" is not a run directory`);
  const bin = join(dir, RUN_FILES.state);
  if (existsSync(bin)) {
    const s = decodeState(readFileSync(bin), bin);
    const values: Record<string, Float64Array> = {};
    s.species.forEach((name, i) => (values[name] = speciesField(s.state, s.species.length, i)));
    return { species: s.species, values };
  }
  const ply = join(dir, RUN_FILES.final);
  if (!existsSync(ply)) throw new Error(`"${dir}" holds neither ${RUN_FILES.state} nor ${RUN_FILES.final}: is it a finished run?`);
  const values = loadSnapshot(ply).fields;
  return { species: Object.keys(values), values };
}

/** The Node environment of a scenario: shapes, mesh files relative to the scenario, previous runs. */
export function nodeScenarioEnvironment(scenarioFile: string): ScenarioEnvironment {
  const base = dirname(resolve(scenarioFile));
  return {
    loadMesh: (spec: MeshSpec): LoadedMesh =>
      scenarioMesh(spec, (file) => {
        const path = resolve(base, file);
        const imported = loadMeshFile(path);
        return { mesh: imported.mesh, vertexData: imported.vertexData, notes: imported.notes, source: { file: path } };
      }),
    loadState: (from: string) => loadRunState(resolve(base, from)),
  };
}
