/**
 * Every default Placode chooses for the user, in one place: what a scenario,
 * a command or the viewer does when it is not told otherwise. Kept free of
 * imports, so the command line can read it without loading any solver code.
 */

/** Seed of every random choice of a run (noise, random spot centres). */
export const DEFAULT_SEED = 1;

// ---- meshes
/** Vertex target of a built-in shape, and the most any mesh may have after its refinements. */
export const DEFAULT_SHAPE_VERTICES = 10_000;
export const MAX_SHAPE_VERTICES = 5_000_000;
/** The largest mesh file read (text formats are read line by line, binary ones in pieces). */
export const MESH_FILE_MAX_BYTES = 4 * 2 ** 30;
/** The largest scenario or sweep file read: a scenario is a page of settings; data belong in mesh files. */
export const TEXT_FILE_MAX_BYTES = 2 ** 20;
/** Eigenvalues closer than this relative gap are reported as one multiple eigenvalue. */
export const EIGEN_CLUSTER_TOLERANCE = 0.01;
/** Eigenpairs `placode modes` computes. */
export const DEFAULT_MODE_COUNT = 20;

// ---- formulas
/** The longest formula accepted, in characters, and the deepest nesting of operators, calls and parentheses. */
export const FORMULA_MAX_LENGTH = 4000;
export const FORMULA_MAX_NESTING = 64;

// ---- time stepping
/** The most steps a run may take: more could not finish (at a million steps a second, 12 days). */
export const MAX_RUN_STEPS = 1e12;
/** A run whose estimated wall-clock time exceeds this stops after its first chunk unless confirmed (`--yes`). */
export const LONG_RUN_SECONDS = 24 * 3600;
/** A mesh of at least this many vertices whose vertex order is scattered (more than this fraction of far edges) gets a note suggesting `reorder`. */
export const SCATTERED_ORDER_VERTICES = 20_000;
export const SCATTERED_ORDER_FRACTION = 0.25;
/** The most threads one run may ask for (time.threads, --threads). */
export const MAX_THREADS = 256;
/** Threads of each run of a sweep unless its scenario sets time.threads: the sweep's pool of workers already fills the cores. */
export const SWEEP_RUN_THREADS = 1;
/** Output interval when the scenario gives none: end / OUTPUTS_PER_RUN. */
export const OUTPUTS_PER_RUN = 20;
/** The explicit scheme's default step, as a fraction of the positivity bound. */
export const EXPLICIT_STEP_FRACTION = 0.9;
/**
 * Default steps stay below this fraction of the reactions' forward-Euler limit at the steady state,
 * min over eigenvalues λ of its Jacobian with Re λ < 0 of −2 Re λ / |λ|² (common practice: half the limit
 * keeps the homogeneous oscillations well damped).
 */
export const REACTION_STEP_FRACTION = 0.5;
/** Jacobi-CG: relative residual tolerance and iteration cap per solve. */
export const CG_TOLERANCE = 1e-8;
export const CG_MAX_ITERATIONS = 2000;
/**
 * `solver: auto` factorises M + dt·D·K once (Cholesky: cost independent of the
 * conditioning, ~0.7 kB per vertex per distinct D) only on meshes up to
 * AUTO_CHOLESKY_VERTICES and only when Jacobi-CG would need many iterations,
 * i.e. when dt·D·λ_max(M⁻¹K) exceeds AUTO_CHOLESKY_STIFFNESS (CG iterations
 * grow like its square root); otherwise warm-started CG is faster and needs
 * ~200 bytes per vertex.
 */
export const AUTO_CHOLESKY_VERTICES = 60_000;
export const AUTO_CHOLESKY_STIFFNESS = 100;

// ---- growth
/** Largest relative change of a vertex's area between geometry updates. */
export const GROWTH_AREA_TOLERANCE = 1e-3;
/** Most vertices refinement during growth may reach. */
export const GROWTH_REFINE_MAX_VERTICES = 400_000;

// ---- analysis
/** Surface modes of the per-frame spectrum, on meshes up to AUTO_SPECTRUM_VERTICES (0 above). */
export const AUTO_SPECTRUM_MODES = 40;
export const AUTO_SPECTRUM_VERTICES = 50_000;
/** How patches are cut out of a field. */
export const DEFAULT_THRESHOLD_RULE = 'mid-range';
/**
 * A field is a pattern only when its contrast (max − min of the measured species) exceeds the floor:
 * PATTERN_NOISE_FACTOR times the noise amplitude the run started from on that species (uniform noise
 * of amplitude a spans 2a, so twice its own range), and PATTERN_RELATIVE_FLOOR times the field's
 * magnitude max(|min|, |max|) (a rule of thumb: round-off and a stable run's decaying noise stay below it).
 */
export const PATTERN_NOISE_FACTOR = 4;
export const PATTERN_RELATIVE_FLOOR = 1e-3;
/** Most surface eigenpairs `placode stability` computes to cover the unstable band. */
export const STABILITY_MAX_MODES = 200;
/** Most eigenpairs a growing run computes at each output to follow its predicted mode. */
export const MAX_TRACKED_MODES = 300;

// ---- mesh quality and resolution
/** A triangle with an angle under this many degrees is a sliver (a rule of thumb, common practice). */
export const SLIVER_ANGLE_DEGREES = 5;
/**
 * Warn when a mesh's explicit step limit is under this share of a well-shaped mesh's of the same size
 * (built-in shapes reach 10–50 %: graded edges cost a few ×; a rule of thumb for "a few bad triangles").
 */
export const EXPLICIT_STEP_RATIO_WARNING = 0.02;
/**
 * Fewest mean edges per fastest-growing wavelength 2π/√k² before a warning. From a refinement study
 * on the unit sphere (DEVELOPERS.md): the P1 eigenvalue of a mode resolved by N edges per wavelength
 * is low by about 2.4 %·(10/N)², second order as Dziuk (1988) proves; at 8 edges about 4 %.
 */
export const MIN_EDGES_PER_WAVELENGTH = 8;

// ---- painting, figures, exports
export const DEFAULT_COLORMAP = 'viridis';
/** Names of the colormaps (`solver/io/colormap.ts` has their tables). */
export const COLORMAP_CHOICES = ['viridis', 'magma', 'inferno', 'plasma', 'cividis', 'diverging', 'greys'] as const;
export const DEFAULT_VIEW = 'iso';
export const FIGURE_SIZE = { width: 900, height: 700, dpi: 150 } as const;
/** Width in pixels of one run's picture on a sweep's contact sheet. */
export const SHEET_THUMBNAIL = 220;
/** Seconds of playback of an animated glTF export of a whole run. */
export const ANIMATION_SECONDS = 10;
/** Formats of a frame or final state (besides PLY, a run writes those its scenario lists). */
export const SNAPSHOT_FORMAT_CHOICES = ['ply', 'glb', 'obj', 'csv'] as const;

// ---- running
/** Longest stretch of stepping between two looks at signals, progress and stop requests (command line). */
export const RUN_CHUNK_MS = 200;
/** The same in the viewer's worker, which posts a frame after each chunk. */
export const VIEWER_CHUNK_MS = 25;
/** The viewer paints a running simulation at most once per this many milliseconds (the latest state only). */
export const VIEWER_PAINT_INTERVAL_MS = 50;
/** The viewer's steps-per-second figure: steps over this much wall-clock time, everything included. */
export const VIEWER_RATE_WINDOW_MS = 1000;
/** Port of `placode view` on 127.0.0.1. */
export const VIEWER_PORT = 5178;
