/**
 * The stiff integrator: variable-order BDF with a sparse LU. Knows nothing of
 * chemistry. See bdf.ts for the method and its references.
 */
export type {
  SparsityPattern,
  OdeProblem,
  IntegrateOptions,
  SolverStats,
  IntegrateResult,
  RankOneJacobian,
} from './types.ts';
export { integrate, DEFAULT_MAX_STEPS, MAX_ORDER } from './bdf.ts';
