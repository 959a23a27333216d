// Order designs for blind sessions: pure and seeded. Callers import from here only. What each
// session format makes of these pieces (its plan, codes and rules) is in server/formats.
export { DesignError } from './errors.ts'
export { createRandom, deriveSeed, hashSeed, shuffle, type Random, type Seed } from './random.ts'
export { williamsOrder, williamsOrders, williamsRowCount, williamsSquare } from './williams.ts'
export { placeRepeats, type Placed } from './repeats.ts'
export { leadsInBase, pairTrials, type PairOptions, type PairTrial } from './pairs.ts'
export {
  repeatOrder,
  TRIANGLE_BLOCK,
  TRIANGLE_ORDERS,
  triangleDeal,
  triangleOrderSequence,
  triangleTrials,
  type TriangleOptions,
  type TriangleOrder,
  type TriangleTrial,
} from './triangle.ts'
export {
  BLIND_CODE_MAX,
  BLIND_CODE_MIN,
  BLIND_CODE_SPACE,
  blindCodes,
  isObviousCode,
} from './blindCodes.ts'
export {
  copiesPerItem,
  dealCodes,
  type CodeEntry,
  type CodeSpec,
  type SessionCodes,
} from './codeMap.ts'
export { checkDesign, type DesignRules } from './validate.ts'
export {
  playersForDifference,
  playersForPreference,
  playersForTriangle,
  roundUpToBlock,
  triangleCriterion,
  type DifferencePlanInput,
  type PreferencePlanInput,
  type SampleSizePlan,
  type TrianglePlanningInput,
} from './planner.ts'
export type {
  BlindClip,
  DesignClip,
  DesignClipSet,
  Id,
  PairTrialPlan,
  PlannedTrial,
  PlayerPlan,
  PlaytestTrialPlan,
  RatingTrialPlan,
  SessionDesignInput,
  SessionFormat,
  TriangleTrialPlan,
} from './types.ts'
