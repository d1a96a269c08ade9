import { EntitySchema } from 'typeorm';
import type { CheckAnswerValue } from '../../shared/api/sync';
import type { Round } from './round';

/** The answer to one check of a round's route version; append-only like readings. */
export interface CheckAnswer {
  id: string;
  roundId: string;
  checkId: string;
  answer: CheckAnswerValue;
  note: string | null;
  deviceTime: Date;
  receivedAt: Date;
  round?: Round;
}

export const CheckAnswerEntity = new EntitySchema<CheckAnswer>({
  name: 'CheckAnswer',
  tableName: 'check_answers',
  columns: {
    id: { type: 'uuid', primary: true, primaryKeyConstraintName: 'pk_check_answers' },
    roundId: { name: 'round_id', type: 'uuid' },
    checkId: { name: 'check_id', type: 'varchar', length: 64 },
    answer: { type: 'jsonb' },
    note: { type: 'text', nullable: true },
    deviceTime: { name: 'device_time', type: 'timestamptz' },
    receivedAt: { name: 'received_at', type: 'timestamptz', default: () => 'now()' },
  },
  relations: {
    round: {
      type: 'many-to-one',
      target: 'Round',
      onDelete: 'CASCADE',
      joinColumn: { name: 'round_id', foreignKeyConstraintName: 'fk_check_answers_round' },
    },
  },
  indices: [{ name: 'ix_check_answers_round', columns: ['roundId'] }],
});
