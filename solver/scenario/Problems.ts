import type { ScenarioSource } from './parseScenario.ts';
import { pathText, sortByLine } from './parseScenario.ts';
import { ScenarioError, type ScenarioProblem } from './ScenarioError.ts';

/** Collects a scenario's problems with their place in the file; `fail` throws them all at once. */
export class Problems {
  readonly list: ScenarioProblem[] = [];
  constructor(private readonly source: ScenarioSource) {}
  /** a problem at a path (the same problem found twice is listed once) */
  add(path: (string | number)[], message: string): void {
    const at = pathText(path);
    if (this.list.some((p) => p.path === at && p.message === message)) return;
    this.list.push({ path: at, message, ...this.source.locate(path) });
  }
  get any(): boolean {
    return this.list.length > 0;
  }
  fail(file: string): void {
    if (this.list.length) throw new ScenarioError(file, sortByLine(this.list));
  }
}

/** What every section resolver works from: the scenario, where it came from, and what it found so far. */
export interface ResolveContext {
  source: ScenarioSource;
  file: string;
  problems: Problems;
  warnings: string[];
}
