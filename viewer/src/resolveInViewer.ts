/**
 * Resolve a scenario's text in the browser exactly as `placode run` resolves
 * a file: parseScenario → resolveScenario, meshes through scenarioMesh; mesh
 * files come from those opened in the page. Throws ScenarioError (or Error).
 */
import { parseScenario } from '../../solver/scenario/parseScenario.ts';
import { resolveScenario, type ResolvedScenario } from '../../solver/scenario/resolveScenario.ts';
import { scenarioMesh, type MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';

export function resolveInViewer(text: string, files: Record<string, MeshFileContents>): ResolvedScenario {
  return resolveScenario(parseScenario(text, 'scenario.yaml'), 'scenario.yaml', {
    loadMesh: (spec) => scenarioMesh(spec, (file) => {
      const f = files[file];
      if (!f) throw new Error(`the mesh file "${file}" is not open in the viewer: open it (or drop it on the page) first`);
      return f;
    }),
    loadState: () => {
      throw new Error('initial.from (a previous run) is read by the command line only; the viewer starts from values, spots and noise');
    },
  });
}
