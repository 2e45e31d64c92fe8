/** Public API of the scoring-model engine (pure TypeScript, no I/O; runs in Node and the browser). */
export * from './types';
export * from './errors';
export { trainOptionsSchema, parseTrainOptions, type TrainOptions, type TrainOptionsInput } from './options';
export { fitBinning, applyBinning, binColumn, codeCount, missingCode, type Binning, type FeatureBins, type BinningOptions } from './binning';
export { trainModel, TIE_TOLERANCE, EPS_CLIP, type RoundTrace, type TrainResult, type TrainHooks } from './train';
export { parseModel, serializeModel, modelSchema, MODEL_FORMAT, MODEL_SCHEMA_VERSION, type Model, type Stump, type PlattCalibration } from './model-schema';
export { scoreRow, scoreBatch, stagedMargins, stagedScores, totalAlpha, probabilityFromMargin, type Score, type BatchScores } from './score';
export { compileModel, buildStepTables, type CompiledScorer, type StepTable } from './compiled';
export { explainRow, topContributions, stepFunctions, featureImportance, formatNumber, type Explanation, type Contribution, type Reason as ReasonCode, type StepFunction } from './explain';
export { calibratePlatt, withCalibration, type PlattFit } from './calibrate';
export {
  rocAuc,
  averagePrecision,
  brierScore,
  reliabilityTable,
  histogramByClass,
  alertBudget,
  amountWeightedRecall,
  psi,
  psiCategorical,
  psiBand,
  evaluate,
  type PsiResult,
  type EvaluationReport,
} from './metrics';
