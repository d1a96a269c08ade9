/**
 * The Trueround engine: cycle model and validator, plant equations, round analysis
 * (the demo units are data and live in demo/).
 * Pure TypeScript, browser-safe (runs on the phone and on the server alike).
 */
export {
  cycleModelSchema,
  pointSchema,
  equipmentSchema,
  instrumentSchema,
  POINT_PHASES,
  EQUIPMENT_KINDS,
  TAG_RE,
  portUses,
  canonicalJson,
  fnv1a64,
  modelVersion,
  type CycleModel,
  type CycleModelInput,
  type CyclePoint,
  type Equipment,
  type EquipmentKind,
  type Instrument,
  type PointPhase,
  type PortRole,
  type PortUse,
} from './model';
export { validateModel, type ValidationError, type ValidationResult } from './validate';
export { effectiveModel, OUT_OF_SERVICE, type EffectiveModel, type MasterInstrumentRow } from './instrument-master';
export {
  buildEquations,
  balanceSpecs,
  SCALE,
  type AcceptedReading,
  type BalanceSpec,
  type ConstraintInfo,
  type EquationSystem,
  type PointRefs,
  type Ref,
  type VarInfo,
  type VarKind,
} from './equations';
export { analyseRound, CycleError, type CycleErrorCode } from './analyse';
export { performanceFigures, figureValues, type FigureState, type StateOf } from './performance';
export { withUncertainty, reconciledStates, meaningfulSpan, K95 } from './figure-uncertainty';
export {
  detectabilityMap,
  nonCentrality,
  WEAK_REDUNDANCY,
  type DetectabilityMap,
  type DetectabilityOptions,
  type InstrumentDetectability,
  type Remedy,
} from './detectability';
export { propsPT, propsSat, tsatSafe, enthalpyOf, type PTProps, type SatProps } from './properties';
export * from './types';
export { sigmaReferenceValue, specSigmaOf } from './analyse';
export {
  cusumOver,
  cusumStep,
  cusumValue,
  decideEvidence,
  CUSUM_H,
  CUSUM_K,
  CUSUM_START,
  EXPLAINED_CORRELATION,
  GROSS_Z,
  type CorrelatedPair,
  type CusumState,
  type EvidenceDecision,
  type InstrumentEvidence,
} from './evidence';
export { LEVEL_LABELS, moreUrgent, severityForCriticality, ATTEND, NOTE, URGENT, type Level } from './severity';
