/**
 * Resolve a scenario's text in the browser exactly as `placode run` resolves
 * a file (parseScenario → resolveScenario, meshes through scenarioMesh); mesh
 * files come from those opened in the page. Throws ScenarioError (or Error).
 */
import type { ResolvedScenario } from '../../solver/scenario/ResolvedScenario.ts';
import type { MeshFileContents } from '../../solver/scenario/scenarioMesh.ts';
import { resolveScenarioText } from '../../solver/scenario/resolveScenarioText.ts';

export function resolveInViewer(text: string, files: Record<string, MeshFileContents>): ResolvedScenario {
  return resolveScenarioText(text, {
    files,
    missingFile: (file) => `the mesh file "${file}" is not open in the viewer: open it (or drop it on the page) first`,
    noPreviousRuns: 'initial.from (a previous run) is read by the command line only; the viewer starts from values, spots and noise',
  });
}
