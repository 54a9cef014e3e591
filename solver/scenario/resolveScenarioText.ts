import { parseScenario } from './parseScenario.ts';
import { resolveScenario } from './resolveScenario.ts';
import type { ResolvedScenario } from './ResolvedScenario.ts';
import { scenarioMesh, type MeshFileContents } from './scenarioMesh.ts';

export interface ScenarioTextOptions {
  /** the name problems are reported under (default `scenario.yaml`) */
  name?: string;
  /** mesh files the scenario names, already read (by the name the scenario uses) */
  files?: Record<string, MeshFileContents>;
  /** the message when the scenario names a mesh file not among `files` */
  missingFile?: (file: string) => string;
  /** the message when the scenario starts from a previous run (`initial.from`), which needs the file system */
  noPreviousRuns?: string;
}

/**
 * Resolve a scenario given as text (YAML, or JSON) without touching the file
 * system: meshes are built-in shapes, or files handed over already read. The
 * viewer's workers and library users in a browser or notebook resolve scenarios
 * this way; `loadScenarioFile` (placode/node) reads files relative to a
 * scenario file instead. Throws a ScenarioError listing every problem.
 */
export function resolveScenarioText(text: string, options: ScenarioTextOptions = {}): ResolvedScenario {
  const name = options.name ?? 'scenario.yaml';
  const files = options.files ?? {};
  return resolveScenario(parseScenario(text, name), name, {
    loadMesh: (spec) => scenarioMesh(spec, (file) => {
      const f = files[file];
      if (!f) throw new Error(options.missingFile?.(file) ?? `the mesh file "${file}" was not given: pass its contents in files, or use loadScenarioFile from placode/node to read it`);
      return f;
    }),
    loadState: () => {
      throw new Error(options.noPreviousRuns ?? 'initial.from (a previous run) is read from the file system: use loadScenarioFile from placode/node');
    },
  });
}
