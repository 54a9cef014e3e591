import type { RunEngine } from './RunEngine.ts';
import type { RunAnalysis } from './RunRecord.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { meshArea } from '../mesh/triangleAreas.ts';
import { forgetMeshTopology, meshTopology } from '../mesh/meshTopology.ts';
import { laplaceBeltramiEigenpairs, type Eigenpairs } from '../fem/laplaceBeltramiEigenpairs.ts';
import { stabilityReport, scenarioBand, modesToCoverBand } from '../analysis/stabilityReport.ts';
import { measurePattern } from '../analysis/measurePattern.ts';
import { patchEvents } from '../analysis/patchEvents.ts';
import type { VertexNeighbours } from '../analysis/thresholdComponents.ts';
import { speciesField } from '../integrate/ReactionDiffusionSystem.ts';
import { MAX_TRACKED_MODES } from '../defaults.ts';
import { bandThroughGrowth } from '../analysis/bandThroughGrowth.ts';

/** The vertex adjacency the pattern measures walk, kept apart from the rest of the topology. */
function adjacency(mesh: Mesh): VertexNeighbours {
  const topo = meshTopology(mesh);
  return { vertexNeighbourOffsets: topo.vertexNeighbourOffsets, vertexNeighbours: topo.vertexNeighbours };
}

/**
 * The pattern measures of a run at its output times, written into the run's
 * `analysis` record: patches of the measured species (count, areas,
 * centroids), the dominant surface-mode cluster, the split / merge / insertion
 * / loss events between outputs, and the linear-stability prediction on the
 * surface (followed as a growing surface changes: its eigenpairs are
 * recomputed at every output, a pure function of the surface, so resumed runs
 * agree).
 */
export class PatternTracker {
  private eig: Eigenpairs | undefined;
  private neighbours: VertexNeighbours;
  private previousLabels: Int32Array | undefined;
  private readonly band: [number, number] | null;
  private readonly growing: boolean;
  private readonly measured: number;

  private warnedShort = false;

  /**
   * `resumed`: the engine starts from a saved state, whose pattern the next events are measured against.
   * `warn` hears, once, when the spectrum cannot reach the unstable band.
   */
  constructor(private readonly engine: RunEngine, private readonly analysis: RunAnalysis, resumed: boolean, private readonly warn: (message: string) => void = () => {}) {
    const r = engine.scenario;
    this.growing = r.growth !== undefined;
    this.measured = r.species.indexOf(r.analysis.species);
    this.band = r.analysis.modes > 0 ? scenarioBand(r) : null;
    if (this.growing && this.band && Number.isFinite(this.band[1]) && !analysis.bandEntries) {
      const law = r.growth!.makeLaw(r.mesh.positions, []);
      // a similarity's course costs one eigen-solve; other laws' is in `placode stability` (eigenpairs of many grown surfaces)
      if (law.similarity) {
        const course = bandThroughGrowth(r.mesh, law, this.band, r.end, { maxModes: Math.max(MAX_TRACKED_MODES, r.analysis.modes) });
        analysis.bandEntries = course.clusters.map(({ eigenvalues: _, ...c }) => ({ ...c, firstEventAfter: null }));
      }
    }
    if (r.analysis.modes > 0 && !this.growing) this.updateEigenpairs(engine.step);
    this.neighbours = adjacency(engine.surface);
    if (!this.growing) forgetMeshTopology(r.mesh); // the stepper holds all it needs; free edges and the CSR pattern
    this.previousLabels = resumed ? this.measure(engine.state).labels : undefined;
  }

  /** The surface was refined: the adjacency changes, events restart, and the eigenpairs follow. */
  refined(step: number): void {
    this.neighbours = adjacency(this.engine.surface);
    this.previousLabels = undefined;
    if (this.engine.scenario.analysis.modes > 0) this.updateEigenpairs(step);
  }

  /** Measure the state at an output step into the record; the patch count and dominant eigenvalue, for the metrics. */
  record(atStep: number, state: Float64Array): { patches: number; dominantEigenvalue?: number } {
    const r = this.engine.scenario, a = this.analysis;
    if (this.growing && r.analysis.modes > 0) this.updateEigenpairs(atStep);
    const pattern = this.measure(state);
    const count = pattern.patches.length;
    if (a.frames.length && a.frames[a.frames.length - 1].patches.length !== count) a.lastCountChange = atStep * r.dt;
    a.frames.push({
      time: atStep * r.dt, step: atStep, threshold: pattern.threshold, contrast: pattern.contrast, floor: pattern.floor,
      patches: pattern.patches.map((p) => ({ area: p.area, centroid: p.centroid })),
      dominantEigenvalue: pattern.dominant?.eigenvalue, dominantFraction: pattern.dominant?.fraction,
    });
    // events between frames that both hold a pattern: the first pattern out of noise is not a string of insertions
    if (this.previousLabels && count > 0) for (const e of patchEvents(this.previousLabels, pattern.labels)) a.events.push({ time: atStep * r.dt, ...e });
    this.previousLabels = count > 0 ? pattern.labels : undefined;
    for (const entry of a.bandEntries ?? []) {
      if (entry.enters === null || entry.firstEventAfter) continue;
      const next = a.events.find((e) => e.time >= entry.enters! && (e.kind === 'insertion' || e.kind === 'split'));
      if (next) entry.firstEventAfter = { time: next.time, kind: next.kind };
    }
    return { patches: count, dominantEigenvalue: pattern.dominant?.eigenvalue };
  }

  private measure(state: Float64Array) {
    const r = this.engine.scenario;
    return measurePattern(this.engine.surface, speciesField(state, r.species.length, this.measured), this.engine.mass, this.neighbours, r.analysis.threshold, this.eig, r.analysis.floor);
  }

  /** Eigenpairs of the surface as it is now, enough to reach the unstable band, and the prediction they give. */
  private updateEigenpairs(atStep: number): void {
    const r = this.engine.scenario, sim = this.engine.sim;
    const surface = sim.stepper.surface;
    const area = meshArea(surface);
    // enough modes to reach the band's upper edge (Weyl's law), at most the cap or the modes the user asked for
    const cover = modesToCoverBand(area, this.band) ?? 0;
    const cap = Math.max(MAX_TRACKED_MODES, r.analysis.modes);
    const count = Math.min(Math.max(r.analysis.modes, cover), cap, sim.vertexCount - 1);
    // (a fixed surface with an intrinsic Delaunay Laplacian keeps its operators; growing surfaces are cotangent)
    this.eig = laplaceBeltramiEigenpairs(surface, { count, mass: 'lumped', operators: this.growing ? undefined : r.laplacianOperators });
    const upTo = this.eig.values[this.eig.values.length - 1];
    this.analysis.modesUpTo = upTo;
    if (this.band && upTo < this.band[1] && !this.warnedShort) {
      this.warnedShort = true;
      const meshShort = cover > sim.vertexCount - 1;
      this.warn(`the unstable band reaches k² = ${this.band[1].toPrecision(4)}; the ${count} surface modes computed reach λ = ${upTo.toPrecision(4)} (covering the band takes about ${cover}${meshShort ? `, more than a mesh of ${sim.vertexCount} vertices has` : ''}): the dominant eigenvalue and the predicted mode see only modes below; ${meshShort ? "refine the mesh to resolve the band's wavelengths" : `set analysis.modes: ${cover} to cover it (eigenpairs cost time and memory)`}`);
    }
    const rep = stabilityReport({ ...r, mesh: surface, system: sim.system }, { eigenpairs: this.eig, raise: 'analysis.modes' });
    const prediction = { state: rep.state, band: rep.turing?.band ?? null, fastest: rep.turing?.fastest ?? null, predicted: rep.predicted, notes: rep.notes };
    if (atStep === 0) this.analysis.prediction = prediction;
    if (this.growing) (this.analysis.predictions ??= []).push({ time: atStep * r.dt, area, vertices: sim.vertexCount, predicted: rep.predicted });
  }
}
