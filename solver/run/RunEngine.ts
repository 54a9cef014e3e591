import type { ResolvedScenario } from '../scenario/ResolvedScenario.ts';
import type { SavedState } from './runFiles.ts';
import type { Mesh } from '../mesh/Mesh.ts';
import { SurfaceSimulation } from './SurfaceSimulation.ts';
import { GrowthDegenerationError } from '../growth/GrowthDriver.ts';
import { prolongField } from '../mesh/Refinement.ts';
import { ThreadError, type ThreadTeam } from '../integrate/ThreadTeam.ts';

/** A refinement made while growing: at which step, and the vertex counts before and after. */
export interface EngineRefinement {
  step: number;
  from: number;
  to: number;
}

/** How a run ended by its own rules: its end time or a steady state. */
export interface EngineFinish {
  reason: 'end' | 'steady-state';
  message: string;
}

/** What `advance` stopped at. */
export type EngineEvent =
  /** the time budget or the step limit was used up between outputs */
  | { kind: 'paused' }
  /** an output step: the surface is up to date; `finish` when the run ends here */
  | { kind: 'output'; step: number; finish?: EngineFinish }
  /** a blow-up (NaN or infinity), a folded surface or a failed thread: the state is the last good one, at `step` */
  | { kind: 'failed'; reason: 'blow-up' | 'degenerate' | 'thread'; step: number; message: string; advice: string };

/**
 * The one run loop of Placode, shared by `placode run`, the sweep workers and
 * the viewer's worker: steps a resolved scenario, moves and refines a growing
 * surface, stops at output steps (where the caller writes or draws), applies
 * the stop rules (end time, steady state) and keeps the last good state when a
 * step blows up or growth folds the surface. Synchronous and free of Node and
 * the DOM: callers give it a time budget and do their own input and output
 * between calls. Everything it does depends on the step count alone, so a run
 * resumed from `saved()` continues bit for bit.
 */
export class RunEngine {
  readonly scenario: ResolvedScenario;
  readonly sim: SurfaceSimulation;
  step: number;
  /** geometry updates made by this engine (a growing run) */
  moves = 0;
  /** called at once when the surface is refined (before any further step): measures that live on the mesh follow */
  onRefined?: (r: EngineRefinement) => void;
  /** the state at the last steady-state check, when the scenario watches for steady state */
  private reference: Float64Array | undefined;
  private referenceStep: number;

  /**
   * At step 0 from the scenario's initial state, or at a saved state (the
   * surface refined and moved as it was); with a team, the sweeps run on its
   * threads (the results are the same to the bit).
   */
  constructor(r: ResolvedScenario, saved?: SavedState, team?: ThreadTeam) {
    this.scenario = r;
    this.sim = new SurfaceSimulation(r, saved, team);
    this.step = saved?.step ?? 0;
    this.reference = r.steadyState !== undefined ? new Float64Array(saved?.reference ?? r.initial) : undefined;
    this.referenceStep = saved ? Math.floor(saved.step / r.output.everySteps) * r.output.everySteps : 0;
  }

  get time(): number {
    return this.step * this.scenario.dt;
  }

  /** The current state (vertex-major); after a failure, the last good one. */
  get state(): Float64Array {
    return this.sim.stepper.state;
  }

  get surface(): Mesh {
    return this.sim.stepper.surface;
  }

  get mass(): Float64Array {
    return this.sim.stepper.mass;
  }

  get vertexCount(): number {
    return this.sim.vertexCount;
  }

  /** threads the current stepper runs on */
  get threads(): number {
    return this.sim.stepper.threads;
  }

  get finished(): boolean {
    return this.step >= this.scenario.steps;
  }

  /**
   * Step until the next output step (the surface brought up to date there),
   * a failure, or the budget: `deadline` (a performance.now() time, looked at
   * every 8 steps) or `maxSteps` steps.
   */
  advance(budget: { deadline?: number; maxSteps?: number } = {}): EngineEvent {
    const r = this.scenario, sim = this.sim, every = r.output.everySteps;
    const target = Math.min(r.steps, (Math.floor(this.step / every) + 1) * every);
    const deadline = budget.deadline ?? Infinity, maxSteps = budget.maxSteps ?? Infinity;
    let taken = 0;
    while (this.step < target) {
      if (sim.driver) {
        const failed = this.moveSurface(false);
        if (failed) return failed;
      }
      let ok: boolean;
      try {
        ok = sim.stepper.step(this.step * r.dt);
      } catch (e) {
        if (!(e instanceof ThreadError)) throw e;
        return this.threadFailed(e);
      }
      this.step++;
      taken++;
      if (!ok) return this.blowUp();
      if (this.step < target && (taken >= maxSteps || ((this.step & 7) === 0 && performance.now() > deadline))) return { kind: 'paused' };
    }
    if (sim.driver) {
      const failed = this.moveSurface(true);
      if (failed) return failed;
    }
    return { kind: 'output', step: this.step, finish: this.stopRule() };
  }

  /** What a saved state needs besides the state itself: the steady-state reference and a growing surface. */
  savedParts(): Pick<SavedState, 'reference' | 'growth'> {
    return { reference: this.reference, growth: this.sim.savedGrowth() };
  }

  /** Move the surface if due (or forced), refining it when its elements have grown; a failure if it folded. */
  private moveSurface(force: boolean): EngineEvent | undefined {
    const sim = this.sim;
    try {
      const before = sim.vertexCount;
      const { moved, refinement } = sim.advanceGeometry(this.step, force);
      if (moved) this.moves++;
      if (refinement) {
        if (this.reference) this.reference = prolongField(this.reference, refinement, this.scenario.species.length);
        this.onRefined?.({ step: this.step, from: before, to: sim.vertexCount });
      }
    } catch (e) {
      if (e instanceof ThreadError) return this.threadFailed(e);
      if (!(e instanceof GrowthDegenerationError)) throw e;
      return { kind: 'failed', reason: 'degenerate', step: this.step, message: e.message, advice: '' };
    }
    return undefined;
  }

  /** A thread failed in a step or a geometry update: neither happened, the state is still the one before it. */
  private threadFailed(e: ThreadError): EngineEvent {
    const t = (this.step * this.scenario.dt).toPrecision(6);
    return { kind: 'failed', reason: 'thread', step: this.step, message: `${e.message} at t=${t} (step ${this.step})`, advice: 'Run it again, or with --threads 1.' };
  }

  /** A step produced NaN or infinity: name where, and go back to the state before it. */
  private blowUp(): EngineEvent {
    const r = this.scenario, stepper = this.sim.stepper, nS = r.species.length;
    const bad = stepper.state;
    let at = 0;
    while (at < bad.length && Number.isFinite(bad[at])) at++;
    const message = `blow-up at t=${(this.step * r.dt).toPrecision(6)} (step ${this.step}): ${r.species[at % nS]} became ${bad[at]} at vertex ${Math.floor(at / nS)}`;
    stepper.setState(stepper.previous);
    this.step--;
    const advice = r.scheme === 'explicit' ? 'Try a smaller time.step or scheme: imex.' : 'Try a smaller time.step: the reactions are integrated explicitly.';
    return { kind: 'failed', reason: 'blow-up', step: this.step, message, advice };
  }

  /** At an output step: a steady state (relative change per unit time below the scenario's), or the end time. */
  private stopRule(): EngineFinish | undefined {
    const r = this.scenario;
    if (this.reference && r.steadyState !== undefined) {
      const state = this.sim.stepper.state;
      const change = relativeChange(state, this.reference, (this.step - this.referenceStep) * r.dt);
      this.reference.set(state);
      this.referenceStep = this.step;
      if (change < r.steadyState) return { reason: 'steady-state', message: `steady state at t=${(this.step * r.dt).toPrecision(6)}: relative change ${change.toExponential(2)} per unit time < ${r.steadyState}` };
    }
    if (this.step >= r.steps) return { reason: 'end', message: `finished at t=${(this.step * r.dt).toPrecision(6)} after ${this.step} steps` };
    return undefined;
  }
}

/** max_i |U − U_ref| / (Δt · max(max_i |U|, 1e-30)). */
function relativeChange(state: Float64Array, reference: Float64Array, interval: number): number {
  let diff = 0, size = 0;
  for (let i = 0; i < state.length; i++) {
    diff = Math.max(diff, Math.abs(state[i] - reference[i]));
    size = Math.max(size, Math.abs(state[i]));
  }
  return diff / (Math.max(interval, 1e-300) * Math.max(size, 1e-30));
}
