import { SWEEP_SECTION_SCHEMA, type SweepSpec } from '../sweep/Sweep.ts';
import { MAX_THREADS } from '../defaults.ts';

/**
 * A scenario file, as written by the user (JSON or YAML). Everything except
 * `mesh`, `kinetics` and `time.end` has a default; `resolveScenario` fills
 * them in and the run record keeps the resolved form.
 */
export interface Scenario {
  name?: string;
  description?: string;
  /** seed of every random choice in the run (noise, random spot centres) */
  seed?: number;
  mesh: MeshSpec;
  kinetics: KineticsSpec;
  /** per species: a number, a formula in x, y, z and the parameters, or a per-vertex value from the mesh file */
  diffusion?: Record<string, FieldValue>;
  initial?: InitialSpec;
  time: TimeSpec;
  output?: OutputSpec;
  analysis?: AnalysisSpec;
  growth?: GrowthSpec;
  fem?: FemSpec;
  /** values to vary in a parameter sweep (`placode sweep plan`); `placode run` runs the scenario as written */
  sweep?: SweepSpec;
}

export interface GrowthSpec {
  /** uniform or anisotropic scaling about a centre, growth along the surface normal, or stage meshes */
  law: 'uniform' | 'anisotropic' | 'normal' | 'keyframes';
  /** keyframes: later stages of the surface, each a mesh file at a time (the run's mesh is the stage at t = 0) */
  keyframes?: { time: number; file: string; landmarks?: Record<string, [number, number, number]> }[];
  /** keyframes: named points on the start mesh (the base centre, the distal tip…), matched to the points of the same names given with each stage */
  landmarks?: Record<string, [number, number, number]>;
  /** keyframes: piecewise linear, or C¹ cubic (default) */
  interpolation?: 'linear' | 'cubic';
  /** keyframes with other connectivity: the global map fitted before the smooth registration onto each stage (default affine) */
  align?: 'none' | 'rigid' | 'similarity' | 'affine';
  /** keyframes with other connectivity: largest tolerated fraction of triangles the map folds or collapses (default 0) */
  maxFolded?: number;
  /** time course of the scale factors (exponential by default) */
  course?: 'exponential' | 'linear' | 'logistic';
  /** uniform: relative growth rate of lengths per unit time */
  rate?: number;
  /** anisotropic: rates along x, y, z (or along `axes`) */
  rates?: [number, number, number];
  /** anisotropic: three orthogonal directions for the rates (default x, y, z) */
  axes?: [[number, number, number], [number, number, number], [number, number, number]];
  /** logistic: the final scale factor (default 2) */
  capacity?: number;
  /** centre of scaling (default: the surface's area centroid) */
  centre?: [number, number, number];
  /** normal: speed along the normal, a formula in x, y, z, t and the kinetics parameters, or per-vertex values from the mesh file */
  speed?: string | { vertexData: string };
  /** normal: a local areal growth rate (formula or per-vertex values); the surface also moves tangentially, putting area where it is high */
  expansion?: string | { vertexData: string };
  /** largest relative change of any vertex's area between geometry updates (default 1e-3) */
  tolerance?: number;
  /**
   * refine (1-to-4) when the mean edge has grown by `edgeGrowth` since the start or the last
   * refinement, or has become longer than the fastest-growing wavelength over `perWavelength`
   */
  refine?: { edgeGrowth?: number; perWavelength?: number; maxVertices?: number };
}

export interface FemSpec {
  /**
   * the discrete Laplace–Beltrami operator: the cotangent one on the mesh's triangles (default), or the
   * cotangent one on its intrinsic Delaunay triangulation (nonnegative weights on poor triangles, same vertices)
   */
  laplacian?: 'cotangent' | 'intrinsic-delaunay';
}

export interface AnalysisSpec {
  /** species whose pattern is measured (default: the painted one) */
  species?: string;
  /** how patches are cut out: the mid-range (default), Otsu's rule, or a fixed value */
  threshold?: 'otsu' | 'mid-range' | number;
  /** surface eigenpairs for the power spectrum and the predicted mode (default 40 up to 50k vertices, else 0 = off) */
  modes?: number;
  /**
   * smallest contrast (max − min of the measured species) that counts as a pattern; below it a frame has
   * no patches and no events. Default: 4 × the starting noise amplitude on that species, and 1e-3 × the
   * field's magnitude
   */
  floor?: number;
}

export type FieldValue = number | string | { vertexData: string };

export interface MeshSpec {
  /** a built-in shape (see `placode shapes`) … */
  shape?: string;
  params?: Record<string, number>;
  vertices?: number;
  /** … or a mesh file, relative to the scenario file */
  file?: string;
  weld?: boolean | number;
  fixOrientation?: boolean;
  dropUnreferenced?: boolean;
  refine?: number;
  loop?: number;
  /** renumber the vertices so that neighbours are close in memory (faster stepping on a scattered mesh file) */
  reorder?: boolean;
  /** isotropic remeshing (Botsch–Kobbelt) before any refinement: true (the mean edge), or a vertex count or edge length */
  remesh?: boolean | { vertices?: number; edge?: number; crease?: number };
  /** close boundary loops of at most this many edges; Taubin smoothing steps (both before remeshing) */
  fillHoles?: number;
  smooth?: number;
  /** multiply the coordinates by this as the mesh is read (0.001 turns µm into mm); every length in the scenario is then in the scaled unit */
  scale?: number;
  /** the length unit of the (scaled) coordinates, shown with lengths, wavelengths, areas and k² (µm, mm, …) */
  units?: string;
}

export interface KineticsSpec {
  /** a built-in model (see `placode models`) … */
  model?: string;
  /** … or your own: species names and a rate formula for each */
  species?: string[];
  reactions?: Record<string, string>;
  /** parameter values: numbers, formulas in x, y, z, or per-vertex values */
  parameters?: Record<string, FieldValue>;
}

export interface InitialSpec {
  /** per species: "steady", a number or a formula in x, y, z; or "steady" for all */
  values?: 'steady' | Record<string, number | string>;
  /** which homogeneous steady state, when the model has several (index, default 0 = first listed) */
  steadyState?: number;
  /** uniform random perturbation in [−a, a], added to every species or to the listed ones */
  noise?: number | { amplitude: number; species?: string[] };
  spots?: SpotsSpec;
  /** start from a previous run's final state (a run directory, relative to the scenario file) */
  from?: string;
}

export interface SpotsSpec {
  /** number of spots at seeded random vertices … */
  count?: number;
  /** … or centres given as points (nearest vertex is used) … */
  centres?: [number, number, number][];
  /** … or as vertex indices */
  vertices?: number[];
  /** geodesic-ish (straight-line) radius around each centre */
  radius: number;
  /** values set inside the spots, per species */
  values: Record<string, number>;
}

export interface TimeSpec {
  scheme?: 'imex' | 'explicit';
  /** time step; default: the model's suggestion (imex) or a stable step (explicit) */
  step?: number;
  end: number;
  /** stop when the relative change per unit time falls below this */
  steadyState?: number;
  /** linear solver of the implicit–explicit scheme; auto: Cholesky up to 60k vertices, CG above */
  solver?: 'auto' | 'cg' | 'cholesky';
  tolerance?: number;
  /** threads to step with; default: the machine's cores (one per run in a sweep); results are the same for any number */
  threads?: number;
  /** run a given step beyond the stability limits the tool computes (refused otherwise): for studying the instability itself */
  allowUnstable?: boolean;
}

export interface OutputSpec {
  /** time between frames (and metrics rows, and checkpoints) */
  every?: number;
  /** species painted as vertex colours */
  colour?: string;
  colormap?: string;
  /** fixed colour range, or "frame" to stretch each frame */
  range?: [number, number] | 'frame';
  frames?: boolean;
  /** formats written for every frame and the final state besides PLY: glb, obj, csv */
  formats?: ('ply' | 'glb' | 'obj' | 'csv')[];
}

const formula = { type: 'string', minLength: 1 };
const vertexData = { type: 'object', properties: { vertexData: { type: 'string', minLength: 1 } }, required: ['vertexData'], additionalProperties: false };
/** a parameter, diffusion coefficient or initial value: constant, formula in x, y, z, or the mesh's per-vertex data */
const fieldValue = { description: 'a number, a formula (text) or {vertexData: NAME}', oneOf: [{ type: 'number' }, formula, vertexData] };
/** a growth speed or expansion rate: a formula in x, y, z, t, or the mesh's per-vertex data */
const growthField = { description: 'a formula in x, y, z, t or {vertexData: NAME}', oneOf: [formula, vertexData] };
const landmarkSet = { type: 'object', description: 'named points {name: [x, y, z]}', additionalProperties: { type: 'array', items: { type: 'number' }, minItems: 3, maxItems: 3 } };

const nameMap = (value: object) => ({ type: 'object', additionalProperties: value, propertyNames: { pattern: '^[A-Za-z][A-Za-z0-9_]*$' } });
/** a built-in model's parameters may also be named as its table writes them (γ, κ, ε, a₀, r₁) */
const parameterMap = (value: object) => ({ type: 'object', additionalProperties: value, propertyNames: { pattern: '^[A-Za-zα-ω][A-Za-z0-9_α-ω₀-₉]*$' } });

/** JSON Schema (draft 2020-12 subset, checked with ajv) of a scenario file. */
export const SCENARIO_SCHEMA = {
  type: 'object',
  additionalProperties: false,
  required: ['mesh', 'kinetics', 'time'],
  properties: {
    name: { type: 'string' },
    description: { type: 'string' },
    seed: { type: 'integer', minimum: 0, maximum: 4294967295 },
    mesh: {
      type: 'object',
      additionalProperties: false,
      properties: {
        shape: { type: 'string', minLength: 1 },
        params: nameMap({ type: 'number' }),
        vertices: { type: 'integer', minimum: 4 },
        file: { type: 'string', minLength: 1 },
        weld: { description: 'true, false or a distance', oneOf: [{ type: 'boolean' }, { type: 'number', minimum: 0 }] },
        fixOrientation: { type: 'boolean' },
        dropUnreferenced: { type: 'boolean' },
        refine: { type: 'integer', minimum: 0, maximum: 6 },
        loop: { type: 'integer', minimum: 0, maximum: 6 },
        reorder: { type: 'boolean' },
        scale: { type: 'number', exclusiveMinimum: 0 },
        remesh: { description: 'true, or {vertices: N} or {edge: h}, with crease: degrees', oneOf: [{ type: 'boolean' }, { type: 'object', additionalProperties: false, properties: { vertices: { type: 'integer', minimum: 4 }, edge: { type: 'number', exclusiveMinimum: 0 }, crease: { type: 'number', exclusiveMinimum: 0, exclusiveMaximum: 180 } } }] },
        fillHoles: { type: 'integer', minimum: 3 },
        smooth: { type: 'integer', minimum: 1, maximum: 1000 },
        units: { type: 'string', minLength: 1, maxLength: 16 },
      },
    },
    kinetics: {
      type: 'object',
      additionalProperties: false,
      properties: {
        model: { type: 'string', minLength: 1 },
        species: { type: 'array', items: { type: 'string' }, minItems: 1, maxItems: 8 },
        reactions: nameMap({ type: 'string' }),
        parameters: parameterMap(fieldValue),
      },
    },
    diffusion: nameMap(fieldValue),
    initial: {
      type: 'object',
      additionalProperties: false,
      properties: {
        values: { description: '"steady", or per species a number, a formula or "steady"', oneOf: [{ const: 'steady' }, nameMap({ description: 'a number, a formula or "steady"', oneOf: [{ type: 'number' }, { type: 'string', minLength: 1 }] })] },
        steadyState: { type: 'integer', minimum: 0 },
        noise: {
          description: 'an amplitude, or {amplitude, species: [names]}',
          oneOf: [
            { type: 'number', minimum: 0 },
            {
              type: 'object',
              additionalProperties: false,
              required: ['amplitude'],
              properties: { amplitude: { type: 'number', minimum: 0 }, species: { type: 'array', items: { type: 'string' }, minItems: 1 } },
            },
          ],
        },
        spots: {
          type: 'object',
          additionalProperties: false,
          required: ['radius', 'values'],
          properties: {
            count: { type: 'integer', minimum: 1 },
            centres: { type: 'array', minItems: 1, items: { type: 'array', items: { type: 'number' }, minItems: 3, maxItems: 3 } },
            vertices: { type: 'array', minItems: 1, items: { type: 'integer', minimum: 0 } },
            radius: { type: 'number', exclusiveMinimum: 0 },
            values: nameMap({ type: 'number' }),
          },
        },
        from: { type: 'string', minLength: 1 },
      },
    },
    time: {
      type: 'object',
      additionalProperties: false,
      required: ['end'],
      properties: {
        scheme: { enum: ['imex', 'explicit'] },
        step: { type: 'number', exclusiveMinimum: 0 },
        end: { type: 'number', exclusiveMinimum: 0 },
        steadyState: { type: 'number', exclusiveMinimum: 0 },
        solver: { enum: ['auto', 'cg', 'cholesky'] },
        tolerance: { type: 'number', exclusiveMinimum: 0, maximum: 0.1 },
        threads: { type: 'integer', minimum: 1, maximum: MAX_THREADS },
        allowUnstable: { type: 'boolean' },
      },
    },
    sweep: SWEEP_SECTION_SCHEMA,
    growth: {
      type: 'object',
      additionalProperties: false,
      required: ['law'],
      properties: {
        law: { enum: ['uniform', 'anisotropic', 'normal', 'keyframes'] },
        keyframes: {
          type: 'array',
          minItems: 1,
          items: { type: 'object', additionalProperties: false, required: ['time', 'file'], properties: { time: { type: 'number', exclusiveMinimum: 0 }, file: { type: 'string', minLength: 1 }, landmarks: landmarkSet } },
        },
        landmarks: landmarkSet,
        interpolation: { enum: ['linear', 'cubic'] },
        align: { enum: ['none', 'rigid', 'similarity', 'affine'] },
        maxFolded: { type: 'number', minimum: 0, maximum: 1 },
        course: { enum: ['exponential', 'linear', 'logistic'] },
        rate: { type: 'number' },
        rates: { type: 'array', items: { type: 'number' }, minItems: 3, maxItems: 3 },
        axes: { type: 'array', minItems: 3, maxItems: 3, items: { type: 'array', items: { type: 'number' }, minItems: 3, maxItems: 3 } },
        capacity: { type: 'number', exclusiveMinimum: 1 },
        centre: { type: 'array', items: { type: 'number' }, minItems: 3, maxItems: 3 },
        expansion: growthField,
        speed: growthField,
        tolerance: { type: 'number', exclusiveMinimum: 0, maximum: 0.5 },
        refine: {
          type: 'object',
          additionalProperties: false,
          minProperties: 1,
          properties: { edgeGrowth: { type: 'number', exclusiveMinimum: 1 }, perWavelength: { type: 'number', exclusiveMinimum: 0 }, maxVertices: { type: 'integer', minimum: 100 } },
        },
      },
    },
    fem: {
      type: 'object',
      additionalProperties: false,
      properties: { laplacian: { enum: ['cotangent', 'intrinsic-delaunay'] } },
    },
    analysis: {
      type: 'object',
      additionalProperties: false,
      properties: {
        species: { type: 'string' },
        threshold: { description: '"otsu", "mid-range" or a number', oneOf: [{ enum: ['otsu', 'mid-range'] }, { type: 'number' }] },
        modes: { type: 'integer', minimum: 0, maximum: 1000 },
        floor: { description: 'smallest contrast (max − min) that counts as a pattern', type: 'number', minimum: 0 },
      },
    },
    output: {
      type: 'object',
      additionalProperties: false,
      properties: {
        every: { type: 'number', exclusiveMinimum: 0 },
        colour: { type: 'string' },
        colormap: { type: 'string' },
        range: { description: '"frame" or [min, max]', oneOf: [{ const: 'frame' }, { type: 'array', items: { type: 'number' }, minItems: 2, maxItems: 2 }] },
        frames: { type: 'boolean' },
        formats: { type: 'array', uniqueItems: true, items: { enum: ['ply', 'glb', 'obj', 'csv'] } },
      },
    },
  },
} as const;
