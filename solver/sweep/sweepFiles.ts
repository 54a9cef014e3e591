import type { SweepPoint } from './expandSweep.ts';

/** Files of a planned sweep directory. */
export const SWEEP_FILES = {
  manifest: 'manifest.jsonl',
  plan: 'sweep.json',
  scenarios: 'scenarios',
  runs: 'runs',
  logs: 'logs',
  failure: 'failure.json',
} as const;

/** One line of a manifest: a run of the sweep. Paths are relative to the sweep directory. */
export interface ManifestEntry {
  index: number;
  /** first 12 hex digits of the sha256 of the run's scenario: the same scenario always gets the same id */
  id: string;
  label: string;
  values: SweepPoint;
  scenario: string;
  run: string;
}
