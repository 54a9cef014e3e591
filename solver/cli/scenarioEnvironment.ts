import { existsSync, readFileSync, statSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join, resolve, dirname } from 'node:path';
import { SHAPES, buildShape } from '../../meshes/shapes/index.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { loadMeshFile } from '../io/meshFiles.ts';
import type { MeshSpec } from '../io/Scenario.ts';
import type { LoadedMesh, ScenarioEnvironment } from '../io/resolveScenario.ts';
import { RUN_FILES, decodeState } from '../io/runFiles.ts';
import { loadSnapshot } from './runFrames.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { validateMesh } from '../mesh/validateMesh.ts';
import { repairMesh } from './meshSource.ts';

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
    loadMesh(spec: MeshSpec): LoadedMesh {
      let mesh: Mesh;
      let vertexData: Record<string, Float64Array> = {};
      const notes: string[] = [];
      let source: Record<string, unknown>;
      if (spec.shape !== undefined) {
        if (!(spec.shape in SHAPES)) throw new Error(`unknown shape "${spec.shape}"; built-in shapes: ${Object.keys(SHAPES).join(', ')}`);
        const built = buildShape({ shape: spec.shape, params: spec.params, vertices: spec.vertices });
        mesh = built.mesh;
        source = { shape: spec.shape, params: built.params, vertices: built.vertices };
      } else {
        if (spec.params || spec.vertices !== undefined) throw new Error('params and vertices apply to built-in shapes, not to mesh files (use refine or loop to refine a file)');
        const path = resolve(base, spec.file!);
        const imported = loadMeshFile(path);
        mesh = imported.mesh;
        vertexData = imported.vertexData;
        notes.push(...imported.notes);
        source = { file: path };
      }
      const weld = spec.weld === undefined || spec.weld === false ? undefined : spec.weld === true ? 0 : spec.weld;
      const repaired = repairMesh(mesh, vertexData, { weld, dropUnreferenced: spec.dropUnreferenced, fixOrientation: spec.fixOrientation, refine: spec.refine, loop: spec.loop });
      const report = validateMesh(repaired.mesh);
      if (report.errors.length) {
        throw new Error(`the mesh cannot be used for surface finite elements: ${report.errors.map((e) => e.message).join('; ')}`);
      }
      notes.push(...repaired.notes, ...report.warnings.map((w) => w.message));
      for (const k of ['weld', 'fixOrientation', 'dropUnreferenced', 'refine', 'loop'] as const) if (spec[k] !== undefined) source[k] = spec[k];
      return { mesh: repaired.mesh, vertexData: repaired.vertexData, source, notes };
    },
    loadState: (from: string) => loadRunState(resolve(base, from)),
  };
}
