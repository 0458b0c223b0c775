import 'server-only';
import { ApiError } from '../http';
import { assertPermission, type Caller } from '../auth';
import { DoaInputError } from '../doa';
import { planAperture, PlanInfeasibleError, type PlanResult } from '../planner';
import { toPlanInput, type PlanRequest } from '../validations/plan';

export type PlanAnswer = PlanResult & {
  propagationSpeedMps: number;
  speedFormula: string;
  warnings: string[];
  snapshotBudgetFrom: 'snapshots' | 'integrationSeconds';
  targets: PlanRequest['targets'];
  method: PlanRequest['method'];
  smoothing: 'none' | 'auto';
  forwardBackward: boolean;
  snrDbPerElement: number;
  scanSectorDeg: number;
};

/**
 * Plans an array (lib/planner). Nothing is stored, so reading arrays is enough
 * (`arrays.read`: every role of the team). An infeasible target is a 422 whose
 * fields name the binding constraint.
 */
export function createPlan({ caller, input }: { caller: Caller; input: PlanRequest }): PlanAnswer {
  assertPermission(caller, 'arrays.read');
  const planInput = toPlanInput(input);
  try {
    const result = planAperture(planInput);
    return {
      ...result,
      propagationSpeedMps: planInput.propagationSpeedMps,
      speedFormula: planInput.speedFormula,
      warnings: planInput.speedWarnings,
      snapshotBudgetFrom: planInput.snapshotField,
      targets: input.targets,
      method: planInput.method,
      smoothing: planInput.smoothing,
      forwardBackward: planInput.forwardBackward,
      snrDbPerElement: planInput.snrDbPerElement,
      scanSectorDeg: planInput.scanSectorDeg,
    };
  } catch (err) {
    if (err instanceof PlanInfeasibleError)
      throw new ApiError('validation_failed', err.message, { fields: err.fields });
    if (err instanceof DoaInputError)
      throw new ApiError('validation_failed', err.message, { fields: { _: [err.message] } });
    throw err;
  }
}
