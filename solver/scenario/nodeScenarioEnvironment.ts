import { resolve, dirname } from 'node:path';
import { loadMeshFile } from '../io/meshFiles.ts';
import type { MeshSpec } from './Scenario.ts';
import type { LoadedMesh, ScenarioEnvironment } from './ResolvedScenario.ts';
import { loadRunState } from '../run/runDirectory.ts';
import { scenarioMesh } from './scenarioMesh.ts';

/** The Node environment of a scenario: shapes, mesh files relative to the scenario, previous runs. */
export function nodeScenarioEnvironment(scenarioFile: string, progress?: (line: string) => void): ScenarioEnvironment {
  const base = dirname(resolve(scenarioFile));
  return {
    loadMesh: (spec: MeshSpec): LoadedMesh =>
      scenarioMesh(spec, (file) => {
        const path = resolve(base, file);
        const imported = loadMeshFile(path);
        return { mesh: imported.mesh, vertexData: imported.vertexData, notes: imported.notes, source: { file: path } };
      }),
    loadState: (from: string) => loadRunState(resolve(base, from)),
    progress,
  };
}
