/** The engine's public surface (re-exports only). */
export * from './document/types';
export { validateModel, analyzeModel } from './document/validate-model';
export type { AnalyzedModel, ModelAnalysis } from './document/validate-model';
export { validateScenario } from './document/validate-scenario';
export { formatProblem, hasErrors } from './document/problems';
export { digestOf, canonicalJson } from './document/digest';
export { compileModel } from './compile/compile-model';
export type { CompiledModel, BoundModel, Modulator } from './compile/compile-model';
export { ModelInvalidError } from './compile/errors';
export { massBalances } from './balance/mass-balances';
export type { MassBalances, StateBalance, BalanceTerm } from './balance/mass-balances';
export { checkIdentity } from './balance/identity';
export { simulate, defaultScenario, runDigest, solverSettings } from './simulate';
export type { SimulateOptions } from './simulate';
export { ENGINE_VERSION } from './version';
export { odexSegment } from './solve/odex-segment';
export { rosenbrockSegment } from './solve/rosenbrock';
export type { OdeSystem, SegmentSolver, SegmentOptions, SegmentResult } from './solve/types';
