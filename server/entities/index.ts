import { MembershipEntity } from './membership';
import { RefreshTokenEntity } from './refresh-token';
import { SiteEntity } from './site';
import { UserEntity } from './user';
import { PlantUnitEntity } from './plant-unit';
import { InstrumentEntity } from './instrument';
import { RouteEntity, RouteVersionEntity } from './route';
import { RoundEntity } from './round';
import { ReadingEntity } from './reading';
import { CheckAnswerEntity } from './check-answer';
import { PhotoEntity } from './photo';
import { AnalysisEntity, AnalysisInstrumentEntity, FindingEntity } from './analysis';
import {
  CalibrationRecordEntity,
  WorkOrderCounterEntity,
  WorkOrderEntity,
  WorkOrderEventEntity,
  WorkOrderFindingEntity,
} from './work-order';
import { MailMessageEntity, MailOutboxEntity } from './mail';

export * from './membership';
export * from './refresh-token';
export * from './site';
export * from './user';
export * from './plant-unit';
export * from './instrument';
export * from './route';
export * from './round';
export * from './reading';
export * from './check-answer';
export * from './photo';
export * from './analysis';
export * from './work-order';
export * from './mail';

/** Every entity the DataSource knows; later features append theirs here. */
export const ENTITIES = [
  SiteEntity,
  UserEntity,
  MembershipEntity,
  RefreshTokenEntity,
  PlantUnitEntity,
  InstrumentEntity,
  RouteEntity,
  RouteVersionEntity,
  RoundEntity,
  ReadingEntity,
  CheckAnswerEntity,
  PhotoEntity,
  MailMessageEntity,
  MailOutboxEntity,
  AnalysisEntity,
  FindingEntity,
  AnalysisInstrumentEntity,
  WorkOrderEntity,
  WorkOrderCounterEntity,
  WorkOrderFindingEntity,
  WorkOrderEventEntity,
  CalibrationRecordEntity,
];
