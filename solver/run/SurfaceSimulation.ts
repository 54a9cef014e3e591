import type { ResolvedScenario } from '../scenario/resolveScenario.ts';
import type { SavedState } from './runFiles.ts';
import { ReactionDiffusionStepper } from '../integrate/ReactionDiffusionStepper.ts';
import type { ReactionDiffusionSystem } from '../integrate/ReactionDiffusionSystem.ts';
import { GrowthDriver } from '../growth/GrowthDriver.ts';
import { transferToRefinement } from '../growth/transferToRefinement.ts';
import { refineMidpoint } from '../mesh/refineMidpoint.ts';
import { prolongField, type Refinement } from '../mesh/Refinement.ts';
import { withPositions, type Mesh } from '../mesh/Mesh.ts';
import { edgeLengthStats } from '../mesh/edgeLengthStats.ts';
import type { ThreadTeam } from '../integrate/ThreadTeam.ts';

const meanEdge = (mesh: Mesh) => edgeLengthStats(mesh).mean;

/**
 * A resolved scenario being stepped: the stepper on the current surface and,
 * for growing scenarios, the growth driver and the midpoint refinements made
 * so far. Shared by the command-line run and the viewer's worker, so both
 * move and refine the surface the same way. DOM- and Node-free.
 */
export class SurfaceSimulation {
  readonly scenario: ResolvedScenario;
  system: ReactionDiffusionSystem;
  stepper: ReactionDiffusionStepper;
  driver: GrowthDriver | undefined;
  /** refinements of the start mesh so far, in order */
  readonly refinements: Refinement[] = [];
  /** the growth law's reference positions, carried through the refinements */
  growthReference: Float64Array;
  /** mean edge length at the start or the last refinement */
  edgeAtRefinement: number;

  /** threads the steppers run on (the caller owns the team and ends it) */
  private readonly team?: ThreadTeam;

  /** Set up at step 0 from the scenario's initial state, or at a saved state (refined and moved as it was). */
  constructor(r: ResolvedScenario, saved?: SavedState, team?: ThreadTeam) {
    this.scenario = r;
    this.team = team;
    this.system = r.system;
    this.growthReference = r.mesh.positions;
    if (saved?.growth) {
      for (let k = 0; k < saved.growth.refinements; k++) this.refine();
      this.system = { ...this.system, mesh: withPositions(this.system.mesh, saved.growth.positions.slice()) };
    }
    // the operators the scenario assembled belong to its start mesh: reused unless the surface has moved or been refined
    this.stepper = new ReactionDiffusionStepper(this.system, this.stepperOptions(), saved?.growth ? undefined : r.operators);
    this.edgeAtRefinement = saved?.growth?.edgeAtRefinement ?? meanEdge(this.system.mesh);
    this.stepper.setState(saved ? saved.state : r.initial);
    const step = saved?.step ?? 0;
    if (r.growth) {
      this.driver = new GrowthDriver(r.growth.makeLaw(this.growthReference, this.refinements), this.vertexCount, r.growth.tolerance, step);
      if (saved?.growth) {
        this.driver.lastUpdate = saved.growth.lastUpdate;
        this.driver.nextUpdate = saved.growth.nextUpdate;
      } else this.driver.start(this.stepper, step, r.dt);
    }
  }

  get vertexCount(): number {
    return this.system.mesh.positions.length / 3;
  }

  private stepperOptions() {
    const r = this.scenario;
    return { scheme: r.scheme, dt: r.dt, solver: r.solver, tolerance: r.tolerance, growing: r.growth !== undefined, team: this.team };
  }

  /** Refine the system's mesh 1-to-4, carrying parameters, diffusion and the growth reference along. */
  private refine(): Refinement {
    const rf = refineMidpoint(this.system.mesh);
    this.refinements.push(rf);
    const prolong = (v: number | Float64Array) => (typeof v === 'number' ? v : prolongField(v, rf));
    this.growthReference = prolongField(this.growthReference, rf, 3);
    this.system = { mesh: rf.mesh, kinetics: this.system.kinetics, parameters: this.system.parameters.map(prolong), diffusion: this.system.diffusion.map(prolong) };
    return rf;
  }

  /**
   * Before step `step` of a growing scenario: move the surface when its
   * tolerance says so (or when `force`d, at output times), and refine it when
   * its mean edge has grown past the scenario's rule. Says whether the
   * surface moved and which refinement was made; throws a
   * GrowthDegenerationError when the growth folds the surface.
   */
  advanceGeometry(step: number, force: boolean): { moved: boolean; refinement?: Refinement } {
    const r = this.scenario;
    if (!this.driver || !this.driver.maybeUpdate(this.stepper, step, r.dt, force)) return { moved: false };
    const rule = r.growth!.refine;
    if (!rule) return { moved: true };
    const edge = meanEdge(this.stepper.surface);
    if (!((edge >= rule.edgeGrowth * this.edgeAtRefinement || edge > rule.maxEdge) && 4 * this.vertexCount <= rule.maxVertices)) return { moved: true };
    const state = this.stepper.state;
    const oldMass = this.stepper.mass;
    this.system = { ...this.system, mesh: this.stepper.surface };
    const rf = this.refine();
    const next = new ReactionDiffusionStepper(this.system, this.stepperOptions());
    next.setState(transferToRefinement(state, oldMass, rf, next.mass, r.species.length));
    this.stepper = next;
    this.driver = new GrowthDriver(r.growth!.makeLaw(this.growthReference, this.refinements), this.vertexCount, r.growth!.tolerance, step);
    this.driver.start(this.stepper, step, r.dt);
    this.edgeAtRefinement = meanEdge(this.stepper.surface);
    return { moved: true, refinement: rf };
  }

  /** What a saved state needs to put a growing surface back as it is. */
  savedGrowth(): SavedState['growth'] {
    if (!this.driver) return undefined;
    return { refinements: this.refinements.length, lastUpdate: this.driver.lastUpdate, nextUpdate: this.driver.nextUpdate, edgeAtRefinement: this.edgeAtRefinement, positions: this.stepper.surface.positions };
  }
}
