import type { Mesh } from '../mesh/Mesh.ts';
import { writePly } from '../io/writePly.ts';
import { colorizeField, type ColormapName } from '../io/colormap.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { crc32 } from '../io/crc32.ts';

/**
 * The files of a run directory, encoded and decoded without touching the disk:
 *   record.json     the resolved scenario, versions, mesh checksum, timings, stop reason
 *   frames/NNNN.ply snapshots: every species as a float property, one painted as colours
 *   final.ply       the last state, same layout
 *   metrics.csv     time, step, per species min/mean/max/∫u dA
 *   state.bin       the last saved state in full precision (resume, `initial.from`)
 */
export const RUN_FILES = { record: 'record.json', metrics: 'metrics.csv', state: 'state.bin', final: 'final.ply', frames: 'frames' } as const;

/** Every file and directory a run writes into its directory (a replaced run's are removed, nothing else). */
export const RUN_OUTPUT_FILES: readonly string[] = [RUN_FILES.record, RUN_FILES.metrics, RUN_FILES.state, RUN_FILES.final, RUN_FILES.frames, 'final.glb', 'final.obj', 'final.csv'];

export function frameName(index: number): string {
  return `${String(index).padStart(4, '0')}.ply`;
}

export interface FrameStyle {
  colour: string;
  colormap: ColormapName;
  range: [number, number] | 'frame';
}

/**
 * PLY vertex property holding a species. Prefixed, because common species
 * names (u, v, s, t) are the PLY convention for texture coordinates and
 * readers would take them as such.
 */
export const speciesProperty = (name: string) => `species_${name}`;

/** Species stored in a frame's vertex data, by species name. */
export function speciesFromProperties(data: Record<string, Float64Array>): Record<string, Float64Array> {
  const out: Record<string, Float64Array> = {};
  for (const [k, v] of Object.entries(data)) if (k.startsWith('species_')) out[k.slice('species_'.length)] = v;
  return out;
}

/** A PLY snapshot of the state: species as float properties, `style.colour` painted. */
export function encodeFrame(mesh: Mesh, species: readonly string[], state: Float64Array, style: FrameStyle, comments: string[]): Uint8Array {
  const nS = species.length;
  const properties: Record<string, Float64Array> = {};
  const fields = species.map((_, i) => speciesField(state, nS, i));
  species.forEach((s, i) => (properties[speciesProperty(s)] = fields[i]));
  const shown = fields[species.indexOf(style.colour)];
  const colors = colorizeField(shown, style.colormap, style.range === 'frame' ? undefined : style.range);
  return writePly(mesh, { colors, properties, comments });
}

export interface SpeciesMetrics {
  min: number;
  mean: number;
  max: number;
  integral: number;
}

/** min, mean, max and ∫u dA (Σ m_i u_i with lumped mass) of every species. */
export function stateMetrics(state: Float64Array, nS: number, mass: Float64Array): SpeciesMetrics[] {
  const n = mass.length;
  let area = 0;
  for (let i = 0; i < n; i++) area += mass[i];
  const out: SpeciesMetrics[] = [];
  for (let s = 0; s < nS; s++) {
    let min = Infinity, max = -Infinity, integral = 0;
    for (let i = 0; i < n; i++) {
      const v = state[i * nS + s];
      if (v < min) min = v;
      if (v > max) max = v;
      integral += mass[i] * v;
    }
    out.push({ min, mean: integral / area, max, integral });
  }
  return out;
}

/** Columns after the per-species ones: the measured pattern, then (growing runs) the surface. */
export const PATTERN_COLUMNS = ['patches', 'dominant_eigenvalue'] as const;
export const GROWTH_COLUMNS = ['area', 'growth_factor', 'vertices'] as const;

export function metricsHeader(species: readonly string[], growing = false): string {
  return ['time', 'step', ...species.flatMap((s) => [`${s}_min`, `${s}_mean`, `${s}_max`, `${s}_integral`]), ...PATTERN_COLUMNS, ...(growing ? GROWTH_COLUMNS : [])].join(',');
}

/** One metrics row; `pattern` values may be undefined (empty cells). */
export function metricsRow(time: number, step: number, m: SpeciesMetrics[], pattern: (number | undefined)[]): string {
  return [time, step, ...m.flatMap((x) => [x.min, x.mean, x.max, x.integral]), ...pattern].map((v) => (v === undefined ? '' : String(v))).join(',');
}

const MAGIC = 'PLCDSTv1';

export interface SavedState {
  step: number;
  time: number;
  /** index of the next frame to write */
  nextFrame: number;
  species: string[];
  vertexCount: number;
  meshChecksum: string;
  dt: number;
  state: Float64Array;
  /** state at the last steady-state check, when the run watches for steady state */
  reference?: Float64Array;
  /** a growing run: the surface (positions after `refinements` midpoint refinements of the start mesh) and its update schedule */
  growth?: { refinements: number; lastUpdate: number; nextUpdate: number; edgeAtRefinement: number; positions: Float64Array };
  /** checksum of the scenario text the state belongs to (resume compares it with the run's record) */
  scenarioChecksum?: string;
}

/**
 * state.bin: 8-byte magic, u32 header length, JSON header, padding to 8 bytes,
 * float64 arrays. The header holds the CRC-32 of the arrays (`payloadCrc32`),
 * so a file damaged after it was written is refused, not resumed from.
 */
export function encodeState(s: SavedState): Uint8Array {
  const { state, reference, growth, ...header } = s;
  const growthHeader = growth ? { refinements: growth.refinements, lastUpdate: growth.lastUpdate, nextUpdate: growth.nextUpdate, edgeAtRefinement: growth.edgeAtRefinement } : undefined;
  const arrays = [state, ...(reference ? [reference] : []), ...(growth ? [growth.positions] : [])];
  const payload = new Uint8Array(arrays.reduce((a, x) => a + x.byteLength, 0));
  let at = 0;
  for (const x of arrays) {
    new Float64Array(payload.buffer, at, x.length).set(x);
    at += x.byteLength;
  }
  const json = new TextEncoder().encode(JSON.stringify({ ...header, hasReference: reference !== undefined, growth: growthHeader, payloadCrc32: crc32(payload) }));
  const headEnd = 12 + json.length;
  const start = Math.ceil(headEnd / 8) * 8;
  const bytes = new Uint8Array(start + payload.length);
  bytes.set(new TextEncoder().encode(MAGIC), 0);
  new DataView(bytes.buffer).setUint32(8, json.length, true);
  bytes.set(json, 12);
  bytes.set(payload, start);
  return bytes;
}

export function decodeState(bytes: Uint8Array, file: string): SavedState {
  const fail = (why: string): never => {
    throw new Error(`${file}: not a readable saved state (${why}); it may be from an interrupted write, damaged, or from another program: the run cannot be resumed from it (start it again with --force)`);
  };
  if (bytes.length < 12 || new TextDecoder().decode(bytes.subarray(0, 8)) !== MAGIC) fail('wrong signature');
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const len = view.getUint32(8, true);
  if (12 + len > bytes.length) fail('truncated header');
  let header: Omit<SavedState, 'state' | 'reference' | 'growth'> & { hasReference: boolean; payloadCrc32?: number; growth?: { refinements: number; lastUpdate: number; nextUpdate: number; edgeAtRefinement: number } };
  try {
    header = JSON.parse(new TextDecoder().decode(bytes.subarray(12, 12 + len)));
  } catch {
    return fail('damaged header');
  }
  if (!Number.isInteger(header.vertexCount) || header.vertexCount < 0 || !Array.isArray(header.species)) fail('damaged header');
  const start = Math.ceil((12 + len) / 8) * 8;
  const count = header.vertexCount * header.species.length;
  const positionsCount = header.growth ? 3 * header.vertexCount : 0;
  const need = start + 8 * (count * (header.hasReference ? 2 : 1) + positionsCount);
  if (bytes.length !== need) fail(`expected ${need} bytes, found ${bytes.length}`);
  const copy = new Uint8Array(bytes.length - start); // own, aligned copy (Node Buffers are views into a pool)
  copy.set(bytes.subarray(start));
  if (header.payloadCrc32 !== undefined && crc32(copy) !== header.payloadCrc32) fail('its data do not match their checksum: the file was changed or damaged after it was written');
  const state = new Float64Array(copy.buffer, 0, count);
  const reference = header.hasReference ? new Float64Array(copy.buffer, 8 * count, count) : undefined;
  const growth = header.growth ? { ...header.growth, positions: new Float64Array(copy.buffer, 8 * count * (header.hasReference ? 2 : 1), positionsCount) } : undefined;
  const { hasReference: _drop, growth: _g, payloadCrc32: _c, ...rest } = header;
  return { ...rest, state, reference, growth };
}
