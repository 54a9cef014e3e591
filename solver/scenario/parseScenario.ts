import { Ajv, type ErrorObject, type ValidateFunction } from 'ajv';
import { LineCounter, parseDocument, isMap, isPair, isScalar, type Document, type Node } from 'yaml';
import { SCENARIO_SCHEMA, type Scenario } from './Scenario.ts';
import { ScenarioError, closestName, type ScenarioProblem } from './ScenarioError.ts';

const ajv = new Ajv({ allErrors: true, verbose: true, strict: true });
/** The scenario schema, compiled once: checks a scenario object (its errors in `.errors`). */
export const validateScenario = ajv.compile(SCENARIO_SCHEMA);

/** A parsed scenario with a way to locate any path in the source text. */
export interface ScenarioSource {
  scenario: Scenario;
  /** line and column (1-based) of the value at a path, or of its key (`atKey`, or when it has no value) */
  locate(path: (string | number)[], atKey?: boolean): { line: number; column: number } | undefined;
}

export function pathText(path: readonly (string | number)[]): string {
  let out = '';
  for (const p of path) out += typeof p === 'number' ? `[${p}]` : out ? `.${p}` : p;
  return out;
}

function locator(doc: Document, lines: LineCounter): ScenarioSource['locate'] {
  return (path, atKey = false) => {
    let node = atKey ? undefined : (doc.getIn(path, true) as Node | undefined);
    if (!node && path.length) {
      // an unknown key: point at the key itself
      const parent = doc.getIn(path.slice(0, -1), true);
      if (isMap(parent)) {
        const pair = parent.items.find((it) => isPair(it) && isScalar(it.key) && it.key.value === path[path.length - 1]);
        node = pair && isScalar(pair.key) ? pair.key : undefined;
      }
    }
    if (!node?.range) return undefined;
    const pos = lines.linePos(node.range[0]);
    return { line: pos.line, column: pos.col };
  };
}

function instancePath(e: ErrorObject): (string | number)[] {
  return e.instancePath
    .split('/')
    .slice(1)
    .map((s) => s.replace(/~1/g, '/').replace(/~0/g, '~'))
    .map((s) => (/^\d+$/.test(s) ? Number(s) : s));
}

function describeValue(v: unknown): string {
  if (v === null) return 'nothing (null)';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'a mapping';
  if (typeof v === 'string') return `text "${v.length > 40 ? v.slice(0, 40) + '…' : v}"`;
  if (typeof v === 'number' && !Number.isFinite(v)) return `${v}, which is not a finite number`;
  return `${typeof v} ${String(v)}`;
}

/** Turn ajv's errors into one readable problem per place. */
function schemaProblems(errors: ErrorObject[], locate: ScenarioSource['locate']): ScenarioProblem[] {
  const oneOfAt = errors.filter((e) => e.keyword === 'oneOf').map((e) => e.instancePath);
  const kept = errors.filter((e) => e.keyword === 'oneOf' || !(e.schemaPath.includes('/oneOf/') && oneOfAt.some((p) => e.instancePath.startsWith(p))));
  const out: ScenarioProblem[] = [];
  const seen = new Set<string>();
  for (const e of kept) {
    let path = instancePath(e);
    let message: string;
    const params = e.params as Record<string, unknown>;
    switch (e.keyword) {
      case 'required':
        message = `missing "${params.missingProperty as string}"`;
        break;
      case 'additionalProperties': {
        const key = params.additionalProperty as string;
        path = [...path, key];
        const known = Object.keys((e.parentSchema as { properties?: object })?.properties ?? {});
        const hint = closestName(key, known);
        message = `unknown key${hint ? ` (did you mean "${hint}"?)` : ''}; expected ${known.join(', ')}`;
        break;
      }
      case 'propertyNames':
        message = `the name "${params.propertyName as string}" is not valid: use a letter followed by letters, digits or _`;
        break;
      case 'pattern':
        continue; // reported by propertyNames
      case 'type':
        message = `must be ${params.type === 'object' ? 'a mapping' : params.type === 'array' ? 'a list' : `a ${params.type as string}`}, got ${describeValue(e.data)}`;
        break;
      case 'enum':
        message = `must be one of ${(params.allowedValues as unknown[]).map((v) => JSON.stringify(v)).join(', ')}, got ${describeValue(e.data)}`;
        break;
      case 'const':
        message = `must be ${JSON.stringify(params.allowedValue)}, got ${describeValue(e.data)}`;
        break;
      case 'oneOf':
        message = `must be ${(e.parentSchema as { description?: string })?.description ?? 'one of the allowed forms'}, got ${describeValue(e.data)}`;
        break;
      default:
        message = `${e.message ?? 'is not valid'}, got ${describeValue(e.data)}`;
    }
    const key = `${pathText(path)}|${message}`;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push({ path: pathText(path), message, ...locate(path, e.keyword === 'additionalProperties') });
  }
  return out;
}

/**
 * Parse YAML (or JSON, YAML's subset) into a mapping and check it against a
 * compiled schema. Throws a ScenarioError listing every problem with its path
 * and line; `what` says what the file should be ("a scenario must be …").
 */
export function parseCheckedYaml(text: string, file: string, check: ValidateFunction, what: string): { data: Record<string, unknown>; locate: ScenarioSource['locate'] } {
  const lines = new LineCounter();
  const doc = parseDocument(text, { lineCounter: lines, uniqueKeys: true });
  if (doc.errors.length) {
    throw new ScenarioError(
      file,
      doc.errors.map((e) => {
        const pos = e.linePos?.[0];
        return { path: '', message: `not valid ${file.endsWith('.json') ? 'JSON/YAML' : 'YAML'}: ${e.message.split('\n')[0].replace(/ at line \d+, column \d+:?$/, '')}`, line: pos?.line, column: pos?.col };
      }),
    );
  }
  let data: unknown;
  try {
    data = doc.toJS({ maxAliasCount: 100 });
  } catch (e) {
    // YAML aliases that expand to an exponential amount of data (an "alias bomb")
    throw new ScenarioError(file, [{ path: '', message: `not usable YAML: ${(e as Error).message.replace('indicates a resource exhaustion attack', '(aliases that expand without bound)')}; write the values out instead of repeating anchors` }]);
  }
  const locate = locator(doc, lines);
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new ScenarioError(file, [{ path: '', message: `${what}, got ${describeValue(data)}` }]);
  }
  if (!check(data)) throw new ScenarioError(file, sortByLine(schemaProblems(check.errors ?? [], locate)));
  return { data: data as Record<string, unknown>, locate };
}

/** Compile a JSON schema with the same settings as the scenario schema. */
export function compileSchema(schema: object): ValidateFunction {
  return ajv.compile(schema);
}

/**
 * Parse a scenario (YAML, or JSON — YAML's subset) and check it against the
 * schema. Throws a ScenarioError listing every problem with its path and line.
 */
export function parseScenario(text: string, file: string): ScenarioSource {
  const { data, locate } = parseCheckedYaml(text, file, validateScenario, 'a scenario must be a mapping with mesh, kinetics and time');
  return { scenario: data as unknown as Scenario, locate };
}

export function sortByLine(problems: ScenarioProblem[]): ScenarioProblem[] {
  return problems.slice().sort((a, b) => (a.line ?? 0) - (b.line ?? 0) || (a.column ?? 0) - (b.column ?? 0));
}
