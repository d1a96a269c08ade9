/**
 * The explicit context the stages of the round analysis pass on: each stage reads what the ones
 * before it made and adds its own results.
 */
import type { makeBase } from './base';
import type { intakeStage } from './intake';
import type { reconciliationStage } from './reconciliation';
import type { statesStage } from './states';
import type { balancesStage } from './balances';
import type { PerformanceFigure } from '../types';

export type BaseCtx = ReturnType<typeof makeBase>;
export type IntakeOut = ReturnType<typeof intakeStage>;
export type RecCtx = BaseCtx & IntakeOut & ReturnType<typeof reconciliationStage>;
export type StatesCtx = RecCtx & ReturnType<typeof statesStage>;
export type FindingsCtx = StatesCtx & ReturnType<typeof balancesStage> & { performance: readonly PerformanceFigure[] };
