/**
 * FEM benchmark. The Coulomb section (accuracy against time) is added by the problem-layer code;
 * the solver section lives in fem-solver.bench-part.ts.
 */
import { runSolverBench } from './fem-solver.bench-part';

export async function run(): Promise<void> {
  await runSolverBench();
}
