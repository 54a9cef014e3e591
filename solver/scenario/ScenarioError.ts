/** One thing wrong with a scenario, located by its path in the file (and line, when known). */
export interface ScenarioProblem {
  /** dotted path, e.g. `kinetics.parameters.F` ('' for the whole file) */
  path: string;
  message: string;
  line?: number;
  column?: number;
}

/** Every problem found in a scenario, each with its place in the file. */
export class ScenarioError extends Error {
  readonly file: string;
  readonly problems: ScenarioProblem[];

  constructor(file: string, problems: ScenarioProblem[]) {
    super(ScenarioError.format(file, problems));
    this.name = 'ScenarioError';
    this.file = file;
    this.problems = problems;
  }

  static format(file: string, problems: ScenarioProblem[]): string {
    const head = problems.length === 1 ? `${file}: 1 problem` : `${file}: ${problems.length} problems`;
    return [head, ...problems.map((p) => `  ${p.line !== undefined ? `line ${p.line}${p.column !== undefined ? `:${p.column}` : ''}  ` : ''}${p.path || '(top level)'}: ${p.message}`)].join('\n');
  }
}

/** Closest candidate by edit distance, for "did you mean" hints (undefined if none is close). */
export function closestName(word: string, candidates: readonly string[]): string | undefined {
  let best: string | undefined;
  let bestD = Infinity;
  const a = word.toLowerCase();
  for (const c of candidates) {
    const b = c.toLowerCase();
    const d: number[] = Array.from({ length: b.length + 1 }, (_, j) => j);
    for (let i = 1; i <= a.length; i++) {
      let prev = d[0];
      d[0] = i;
      for (let j = 1; j <= b.length; j++) {
        const tmp = d[j];
        d[j] = Math.min(d[j] + 1, d[j - 1] + 1, prev + (a[i - 1] === b[j - 1] ? 0 : 1));
        prev = tmp;
      }
    }
    if (d[b.length] < bestD) {
      bestD = d[b.length];
      best = c;
    }
  }
  return best !== undefined && bestD <= Math.max(1, Math.floor(word.length / 3)) ? best : undefined;
}
