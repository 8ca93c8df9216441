import { defineEntity, p, type InferEntity } from '@mikro-orm/core';

// The table connect-pg-simple keeps browser sessions in. Only that store reads and
// writes it; it is declared here so schema diffs create it and never drop it.
export const Session = defineEntity({
  name: 'Session',
  tableName: 'session',
  properties: {
    sid: p.string().primary(),
    sess: p.json<Record<string, unknown>>(),
    expire: p.datetime(6).index('IDX_session_expire'),
  },
});
export type Session = InferEntity<typeof Session>;
