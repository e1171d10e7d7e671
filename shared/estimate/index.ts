export { calculateEstimate, EstimateInputError, safeCalculateEstimate, summarise } from './engine'
export type { EstimateIssue, SafeEstimateResult } from './engine'
export { EstimateInputSchema } from './prepare'
