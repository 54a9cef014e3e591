/**
 * Placode as a library: everything that runs the same in Node, in a browser
 * worker and in a notebook — meshes, surface finite-element operators,
 * eigenpairs, kinetics, time stepping, the run loop, stability analysis,
 * pattern measures and encoders. No file system here: `placode/node` adds
 * files, run directories and sweeps.
 *
 *   import { buildShape, laplaceBeltramiEigenpairs } from 'placode';
 */

// ---- meshes: flat typed arrays, topology, checks, repairs, refinement, built-in shapes
export { type Mesh, makeMesh, withPositions, vertexCount, triangleCount } from './mesh/Mesh.ts';
export { meshTopology, forgetMeshTopology, type MeshTopology } from './mesh/meshTopology.ts';
export { validateMesh, type MeshReport, type MeshIssue } from './mesh/validateMesh.ts';
export { meshStatistics, type MeshStatistics } from './mesh/meshStatistics.ts';
export { meshArea, triangleAreas } from './mesh/triangleAreas.ts';
export { edgeLengthStats, type EdgeLengthStats } from './mesh/edgeLengthStats.ts';
export { vertexNormals } from './mesh/vertexNormals.ts';
export { weldVertices } from './mesh/weldVertices.ts';
export { orientTriangles } from './mesh/orientTriangles.ts';
export { dropUnreferencedVertices } from './mesh/dropUnreferencedVertices.ts';
export { repairMesh, type MeshRepairs } from './mesh/repairMesh.ts';
export { refineMidpoint } from './mesh/refineMidpoint.ts';
export { loopSubdivide } from './mesh/loopSubdivide.ts';
export { prolongField, type Refinement } from './mesh/Refinement.ts';
export { SHAPES, buildShape, type ShapeRequest } from '../meshes/shapes/index.ts';
export type { ShapeDefinition } from '../meshes/shapes/ShapeDefinition.ts';

// ---- surface finite elements and linear algebra
export { cotanStiffness } from './fem/cotanStiffness.ts';
export { lumpedMass } from './fem/lumpedMass.ts';
export { consistentMass } from './fem/consistentMass.ts';
export { vertexSparsityPattern } from './fem/vertexSparsityPattern.ts';
export { laplaceBeltramiEigenpairs, type Eigenpairs, type EigenpairOptions, type MassKind } from './fem/laplaceBeltramiEigenpairs.ts';
export { type CsrMatrix, csrMultiply, csrEntry, csrCombine, csrAddDiagonal } from './linalg/CsrMatrix.ts';
export { SparseCholesky } from './linalg/SparseCholesky.ts';
export { blockLanczos } from './linalg/blockLanczos.ts';
export { symmetricEigen } from './linalg/symmetricEigen.ts';

// ---- kinetics: built-in models and the formula language
export { MODELS } from './kinetics/models/index.ts';
export type { KineticsModel } from './kinetics/KineticsModel.ts';
export { compileKinetics, KineticsError, type CompiledKinetics } from './kinetics/compileKinetics.ts';
export { FormulaError } from './kinetics/FormulaError.ts';
export { evaluateSurfaceFormula } from './kinetics/surfaceField.ts';

// ---- time stepping and growth
export { ReactionDiffusionStepper, type StepperOptions } from './integrate/ReactionDiffusionStepper.ts';
export { type ReactionDiffusionSystem, speciesField } from './integrate/ReactionDiffusionSystem.ts';
export { explicitStepLimit, systemExplicitLimit, type ExplicitStepLimit } from './integrate/explicitStepLimit.ts';
export { ThreadTeam, ThreadError, type HelperThread, type SpawnHelper } from './integrate/ThreadTeam.ts';
export type { GrowthLaw } from './growth/GrowthLaw.ts';
export { affineGrowth } from './growth/affineGrowth.ts';
export { normalGrowth } from './growth/normalGrowth.ts';
export { keyframeGrowth } from './growth/keyframeGrowth.ts';
export { mapOntoSurface, locateOnSurface, type SurfaceMap, type SurfaceMapOptions, type StageLandmark } from './growth/mapOntoSurface.ts';
export { mapDistortion, type MapDistortion } from './growth/mapDistortion.ts';
export { stageMapReport, formatStageMap, type StageMapReport } from './growth/stageMapReport.ts';
export { SurfaceProjector } from './mesh/surfaceProjector.ts';

// ---- scenarios and the run loop
export type { Scenario } from './scenario/Scenario.ts';
export { parseScenario } from './scenario/parseScenario.ts';
export { resolveScenario } from './scenario/resolveScenario.ts';
export { resolveScenarioText, type ScenarioTextOptions } from './scenario/resolveScenarioText.ts';
export type { ResolvedScenario, ScenarioEnvironment, LoadedMesh } from './scenario/ResolvedScenario.ts';
export { ScenarioError, type ScenarioProblem } from './scenario/ScenarioError.ts';
export { RunEngine, type EngineEvent } from './run/RunEngine.ts';
export { usefulThreads } from './run/runThreads.ts';
export { PatternTracker } from './run/PatternTracker.ts';
export type { RunRecord, RunAnalysis, StopReason } from './run/RunRecord.ts';
export { encodeState, decodeState, encodeFrame, type SavedState } from './run/runFiles.ts';

// ---- stability and pattern measures
export { turingAnalysis, growthRate, type TuringAnalysis } from './analysis/dispersion.ts';
export { stabilityReport, type StabilityReport, type StabilityProblem } from './analysis/stabilityReport.ts';
export { numericalSteadyStates } from './analysis/steadyStates.ts';
export { surfaceModeRates } from './analysis/surfaceModeRates.ts';
export { parameterMap } from './analysis/parameterMap.ts';
export { measurePattern, type PatternMeasure, type ThresholdRule } from './analysis/measurePattern.ts';
export { thresholdComponents } from './analysis/thresholdComponents.ts';
export { otsuThreshold } from './analysis/otsuThreshold.ts';
export { modeSpectrum } from './analysis/modeSpectrum.ts';
export { patchEvents, type PatchEvent } from './analysis/patchEvents.ts';

// ---- encoders and figures (bytes in memory)
export { parseMeshFile, type ImportedMesh } from './io/parseMeshFile.ts';
export { MeshFileError } from './io/MeshFileError.ts';
export { writePly } from './io/writePly.ts';
export { writeObj } from './io/writeObj.ts';
export { writeStl } from './io/writeStl.ts';
export { writeOff } from './io/writeOff.ts';
export { writeGlb, writeAnimatedGlb } from './io/writeGlb.ts';
export { encodeSnapshot, type SnapshotFormat } from './io/encodeSnapshot.ts';
export { colorizeField, colormapTable, COLORMAPS, type ColormapName } from './io/colormap.ts';
export { surfaceFigureSvg, type FigureSpec, type FigurePanel } from './io/surfaceFigure.ts';
export { rasterSurfaces, SHADINGS, type Shading } from './io/surfaceRaster.ts';
export { VIEW_PRESETS } from './io/surfaceView.ts';

export * as defaults from './defaults.ts';
