export { planDrainTest, type PlanResult, type PlannedTest, type UncertaintyLine } from './plan.js';
export {
  planRequestSchema,
  type PlanRequest,
  type PlanRequestInput,
  type TargetQuantity,
} from './schema.js';
export { drainTimeS, drainCurve, surfaceAfter } from './drain-time.js';
export { noiseModel } from './information.js';
export { PLAN_CAUTIONS } from './cautions.js';
