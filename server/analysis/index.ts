// The statistics engine: pure functions over plain arrays. Callers import from here only.
export type { Alternative, Id, Interval, Rating, Reason } from './types.ts'

export {
  aggregateRatings,
  completeCases,
  recipeColumn,
  type AggregatedRatings,
  type AggregateOptions,
  type AttributeTable,
  type CompleteCases,
} from './aggregate.ts'
export { meanOf, summarizeMean, varianceOf, type MeanSummary } from './describe.ts'
export { rankAverage, type Ranking } from './rank.ts'
export { oneSampleT, pairedTTest, type PairedTOptions, type PairedTResult } from './paired.ts'
export {
  signedRankCdf,
  wilcoxonCriticalT,
  wilcoxonSignedRank,
  WILCOXON_EXACT_LIMIT,
  type WilcoxonOptions,
  type WilcoxonResult,
} from './wilcoxon.ts'
export { holm } from './holm.ts'
export { benjaminiHochberg } from './benjaminiHochberg.ts'
export { ADJUSTMENT_LABEL, ADJUSTMENTS, adjustP, type Adjustment } from './adjust.ts'
export { friedman, type FriedmanResult } from './friedman.ts'
export {
  binomialLower,
  binomialPmf,
  binomialTest,
  binomialUpper,
  clopperPearson,
  signTest,
  type BinomialTestOptions,
  type BinomialTestResult,
  type SignTestResult,
} from './binomial.ts'
export {
  bradleyTerry,
  winsMatrix,
  type BradleyTerryAbility,
  type BradleyTerryOptions,
  type BradleyTerryResult,
  type PairChoice,
} from './bradleyTerry.ts'
export {
  dPrimeSentence,
  triangleDPrime,
  triangleDPrimeFromPc,
  trianglePc,
  type TriangleDPrime,
} from './dPrime.ts'
export {
  proportionDiscriminators,
  TRIANGLE_GUESS_RATE,
  triangleMinimumCorrect,
  triangleTest,
  type TriangleResult,
} from './triangle.ts'
export {
  DUPLICATE_TOLERANCE,
  MAX_MISS_SHARE,
  MIN_DUPLICATE_PAIRS,
  RELIABILITY_RULE,
  reliability,
  reliabilityRule,
  type PlayerReliability,
  type ReliabilityOptions,
  type ReliabilityResult,
} from './reliability.ts'
export {
  pearson,
  spearman,
  spearmanRho,
  SPEARMAN_EXACT_LIMIT,
  type CorrelationResult,
} from './correlation.ts'
export { pearsonTest, type PearsonTestResult } from './pearsonTest.ts'
export { SPEARMAN_SERIES_LIMIT, spearmanLower, spearmanP, spearmanUpper } from './spearmanP.ts'
export { attributeHeadline } from './headline.ts'
export { compactLetters, type PairVerdict } from './compactLetters.ts'
export {
  correlateMeasures,
  objectiveVsPerceived,
  perceivedMeans,
  type PerceivedMeans,
  type ClipMeasure,
  type MeasureCorrelation,
  type ObjectiveOptions,
} from './objectiveVsPerceived.ts'
export {
  pairedTPower,
  pairedTSampleSize,
  signTestPower,
  signTestSampleSize,
  trianglePower,
  triangleSampleSize,
  type PairedTPlanInput,
  type SampleSizePlan,
  type SignTestPlanInput,
  type TrianglePlanInput,
} from './planning.ts'
export { formatInterval, formatNumber, formatP } from './format.ts'
export {
  mixedModel,
  type MarginalMean,
  type MixedModelRating,
  type MixedModelResult,
  type RecipeContrast,
} from './mixedModel.ts'
export { attributeMixedModel, type MixedModelSummary } from './mixedFindings.ts'
export { interimLook, type InterimLook, type InterimOptions } from './interim.ts'
export { omnibusSentence, pairSentence, type PairWording } from './sentences.ts'
export {
  computeFindings,
  type AttributeFindings,
  type AttributeInfo,
  type Findings,
  type FindingsInput,
  type RecipeInfo,
  type RecipeMean,
} from './findings.ts'
export type { PairRow } from './recipePairs.ts'
export type { OmnibusLine } from './omnibus.ts'
export {
  preferenceFindings,
  type PreferenceAnswer,
  type PreferenceFindings,
  type PreferencePair,
} from './preferences.ts'
