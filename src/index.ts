/**
 * chernel's public API: exactly what a notebook cell sees.
 */

// Models: the description, validation, builder, builders, catalogue
export { MODEL_FORMAT, MODEL_VERSION } from './model/spec.js';
export type { Amplitude, ComplexAmplitude, ModelSpec, OrbitalSpec, ParameterSpec, ParameterValues, TermSpec } from './model/spec.js';
export { ModelError } from './model/errors.js';
export { validateModel, checkBandSelection } from './model/validate.js';
export { resolveParameters } from './model/expressions.js';
export { lattice, LatticeBuilder, type Harmonic, type OrbitalMatrix, type SpinMatrix } from './model/builder.js';
export { supercell, type SupercellOptions } from './model/builders/supercell.js';
export { ribbon, flake, type RibbonOptions, type FlakeOptions } from './model/builders/open.js';
export { magneticFlux, type FluxOptions } from './model/builders/flux.js';
export { bogoliubov, type BogoliubovOptions } from './model/builders/bdg.js';
export { coupledWireArray, type CoupledWireArrayOptions } from './model/builders/wires.js';
export { ssh, riceMele, kitaevChain, qwz, haldane, kaneMele, bhz, hofstadter, coupledWires, twoBandWeyl, CATALOGUE, catalogueModel, type CoupledWireOptions } from './model/catalogue.js';

// Bloch Hamiltonians
export { BlochHamiltonian, blochHamiltonian, type BlochConvention, type BlochOptions } from './bloch/hamiltonian.js';

// One call for every diagnostic
export { compute, computeAsync, computeOn, joinParts, type ComputeAsyncOptions, type ComputedResult, type ComputeOptions, type DiagnosticResult } from './compute.js';
export { checkRequest, DIAGNOSTIC_KINDS, estimateCost, requestFields, type DiagnosticKind, type DiagnosticRequest } from './request.js';
export { DIAGNOSTICS, diagnosticOf, KIND_NAMES, splits, type KindName, type KindRequest, type KindResult, type SplitKind } from './diagnostics/registry.js';
export { type Diagnostic, type PointOutcome, type ResultBase } from './diagnostics/diagnostic.js';
export { computeBudget, setComputeBudget, type ComputeBudget, type CostEstimate } from './cost.js';
export { closestName } from './model/field-names.js';

// Spectra
export { type BandGroup, type BandSelection, type KPoint, type SpectrumChecks, type SpectrumSource } from './spectra/common.js';
export { reciprocalVectors, cartesianMomentum, highSymmetryPoints, type HighSymmetryPoints, type LatticeFamily } from './spectra/lattice.js';
export { kPath, type KPath, type PathOptions, type PathPoint, type PathSpec } from './spectra/path.js';
export { bandStructure, type BandsOptions, type BandsResult } from './spectra/bands.js';
export { directGap, findGapClosings, type GapClosing, type GapClosingOptions, type GapClosingResult, type GapOptions, type GapResult } from './spectra/gap.js';
export { densityOfStates, type DosOptions, type DosResult } from './spectra/dos.js';
export { ribbonSpectrum, type RibbonSpectrumOptions, type RibbonSpectrumResult } from './spectra/ribbon.js';

// Topology
export { FrameSampler, type PlaneSpec, type TopologyChecks, type TopologyOptions, type TopologySource } from './topology/common.js';
export { chernNumber, type ChernChecks, type ChernOptions, type ChernResult } from './topology/chern.js';
export { curvatureMap, type CurvatureChecks, type CurvatureMethod, type CurvatureOptions, type CurvatureResult } from './topology/curvature.js';
export { wannierFlow, type WannierFlowChecks, type WannierFlowOptions, type WannierFlowResult } from './topology/wilson.js';
export { joinCurvatureParts, joinWannierFlowParts, partBounds, type CurvaturePart, type WannierFlowPart, type DiagnosticPart, type PartSpec, type GapRecord } from './topology/parts.js';
export { berryPhase, type BerryPhaseChecks, type BerryPhaseOptions, type BerryPhaseResult } from './topology/berry.js';
export { z2Index, spinChern, type MatrixEntry, type SpinChernResult, type Z2Checks, type Z2Method, type Z2Options, type Z2Plane, type Z2Result } from './topology/z2.js';
export { windingNumber, majoranaNumber, type MajoranaResult, type WindingOptions, type WindingResult } from './topology/chiral.js';
export { weylPoints, type WeylOptions, type WeylPoint, type WeylResult } from './topology/weyl.js';
export { hallConductivity, ELEMENTARY_CHARGE, PLANCK_CONSTANT, HALL_CONDUCTANCE_QUANTUM, type HallOptions, type HallResult } from './topology/hall.js';

// Sweeps, phase maps, cluster plans
export { runPhaseMap, phaseMapSync, makeCheckpoint, CHECKPOINT_FORMAT, type RunPhaseMapOptions, type SweepCheckpoint, type SweepProgress, type PointRecord } from './scan/run.js';
export { advanceSweep, axisValues, validatePhaseMapRequest, SWEEP_QUANTITIES, type PhaseMapRequest, type PhaseMapResult, type PhaseBoundary, type LevelCrossing, RESOLVING_ERRORS, type PhaseMapAxis, type PhaseMapChecks, type SweepAxis, type SweepQuantity, type RefineOptions, type PointFunction, type PointTarget } from './scan/sweep.js';
export { InProcessExecutor, PointError, type SweepExecutor, type StopSignal, type EvaluateHooks, type PointFunctionFactory } from './scan/executor.js';
export { WorkerPoolExecutor, serveSweepWorker, type WorkerPort } from './scan/pool.js';
export { pointFunction } from './scan/point.js';
export { sweepPlan, validatePlan, planTasks, shardTasks, runShard, mergeShards, PLAN_FORMAT, SHARD_FORMAT, type SweepPlan, type ShardOutput, type MergeReport } from './scan/plan.js';

// Linear algebra
export { type CMatrix, cmatrix } from './linalg/cmatrix.js';
export { HermitianEigensolver, eigh } from './linalg/eigh.js';
export { UnitaryEigenphases, eigenphases } from './linalg/eigphases.js';
export { ComplexDeterminant, determinant } from './linalg/determinant.js';
export { ComplexPfaffian, pfaffian } from './linalg/pfaffian.js';

// Interruption of long loops
export { InterruptedError, checkInterrupt, installInterruptFlag } from './interrupt.js';

// Real-space samples and invariants (disorder, finite samples, Chebyshev expansion)
export { SeededRandom, checkSeed } from './realspace/random.js';
export { matvec, toDense, gershgorinBounds, TripletList, type SparseMatrix } from './realspace/sparse.js';
export { buildSample, sampleCost, checkSampleOptions, type Sample, type SampleOptions, type Boundary, type DisorderDescription } from './realspace/sample.js';
export { occupiedStates, spectrumAtFermi, type FermiOptions, type SpectrumAtFermi, type OccupiedStates } from './realspace/occupied.js';
export { bottIndex, bottOfSample, bottCost, type BottOptions, type BottResult, type BottChecks } from './realspace/bott.js';
export { spinBottIndex, spinBottOfSample, type SpinBottOptions, type SpinBottResult, type SpinBottChecks } from './realspace/spin-bott.js';
export { chainWinding, chainWindingCost, type ChainWindingOptions, type ChainWindingResult } from './realspace/winding.js';
export { localMarker, markerOfSample, localMarkerCost, type LocalMarkerOptions, type LocalMarkerResult } from './realspace/marker.js';
export { chebyshevMarker, chebyshevMarkerOfSample, chebyshevMarkerCost, cleanGapMiddle, type ChebyshevMarkerOptions } from './realspace/kpm-marker.js';
export { chernMarker, chernMarkerCost, type ChernMarkerOptions } from './realspace/chern-marker.js';
export { localDensity, densityOfSample, localDensityCost, type LocalDensityOptions, type LocalDensityResult } from './realspace/ldos.js';
export { chebyshevScaling, chebyshevApply, jacksonKernel, stepCoefficients, deltaCoefficients, localMoments, type ChebyshevScaling } from './realspace/kpm.js';
export { disorderEnsemble, ensembleOf, joinEnsembles, ensembleCost, type EnsembleDiagnostic, type EnsembleOptions, type EnsembleResult } from './realspace/ensemble.js';

// Semi-infinite edges and surfaces: principal layers, decimation, spectral functions, maps, slabs, bulk–boundary check
export { cubicTI } from './model/catalogue.js';
export { principalLayers, planeBasis, resolveCut, type CutSpec, type PrincipalLayers, type SplitMatrix } from './surface/layers.js';
export { Decimation, DECIMATION_MAX_STEPS, DECIMATION_TOLERANCE, type DecimationOutcome } from './surface/decimation.js';
export { type CutInfo, type DecimationOptions } from './surface/common.js';
export { surfaceSpectrum, surfaceSpectrumCost, type SurfaceChecks, type SurfaceSpectrumOptions, type SurfaceSpectrumResult } from './surface/spectrum.js';
export { surfaceMap, surfaceMapCost, type ProjectedNode, type SurfaceMapOptions, type SurfaceMapResult } from './surface/fermi-map.js';
export { slabSpectrum, slabSpectrumCost, type SlabSpectrumOptions, type SlabSpectrumResult } from './surface/slab.js';
export { bulkBoundary, bulkBoundaryCost, type ArcLine, type ArcStep, type BoundaryInvariant, type BoundaryKind, type BoundaryVerdict, type BulkBoundaryOptions, type BulkBoundaryResult, type DiracPoint, type EdgeCount, type EdgeMode, type EndCount, type EndMode, type SurfaceCount } from './surface/bulk-boundary.js';
