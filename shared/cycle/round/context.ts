/**
 * The explicit context the stages of the round analysis pass on: each stage reads what the ones
 * before it made and adds its own results (base → intake → reconciliation → states → balances;
 * each stage module exports the context it leaves behind). The findings read all of it.
 */
import type { balancesStage } from './balances';
import type { StatesCtx } from './states';
import type { PerformanceFigure } from '../types';

export type { BaseCtx } from './base';
export type { IntakeOut } from './intake';
export type { RecCtx } from './reconciliation';
export type { StatesCtx } from './states';
export type FindingsCtx = StatesCtx & ReturnType<typeof balancesStage> & { performance: readonly PerformanceFigure[] };
