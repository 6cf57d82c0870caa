/**
 * Public surface of the analysis core: pure functions over typed arrays and plain objects.
 * Nothing here touches files, the network or the database.
 */
export * from './types';
export { createAnalyser, type Analyser, type AnalyserOptions } from './analyser';
export { judge, judgeVariable, runMetrics, verdictOf, type Judgement, type VariableJudgement } from './judge';
export {
  DEFAULT_POLICY,
  parsePolicy,
  policySchema,
  resolveRules,
  variableOverrideSchema,
  type CheckLevel,
  type Policy,
  type PolicyInput,
  type VariableOverride,
  type VariableRules,
} from './policy';
export type * from './summary';
export { SUMMARY_VERSION } from './summary';
export { totalVariation, totalVariationStrided, type TotalVariationOptions } from './total-variation';
export { countExtrema, countExtremaStrided, type ExtremaOptions } from './extrema';
export { errorNorms, observedOrder, type ErrorNorms, type ErrorNormOptions } from './error-norms';
export { sumCompensated, sumCompensatedStrided } from './summation';
export {
  isBinary,
  massNoise,
  tvNoise,
  unitRoundoff,
  valueError,
  valueFloor,
  UNIT_ROUNDOFF_FLOAT32,
  UNIT_ROUNDOFF_FLOAT64,
} from './noise-floor';
export { frontSide, maxSumWindow, type FrontRelation, type FrontSide, type SumWindow } from './localise';
export { axisCentre, axisWidths, cellSizes, gridLayout, unravelIndex, type CellSizes, type GridLayout } from './grid';
