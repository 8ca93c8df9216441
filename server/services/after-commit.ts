import type { EntityManager, EventSubscriber, MikroORM, TransactionEventArgs } from '@mikro-orm/core';

// Work that must only happen once a transaction is committed (mail about a charge,
// say): queued against the transaction and run by one subscriber after its commit.
const pending = new WeakMap<object, Array<() => Promise<void>>>();

export function afterCommit(em: EntityManager, task: () => Promise<void>): void {
  const trx = em.getTransactionContext<object>();
  if (!trx) {
    void run(task);
    return;
  }
  const list = pending.get(trx) ?? [];
  list.push(task);
  pending.set(trx, list);
}

async function run(task: () => Promise<void>): Promise<void> {
  try {
    await task();
  } catch (err) {
    console.error('[server] after-commit task failed', err);
  }
}

const subscriber: EventSubscriber = {
  async afterTransactionCommit({ transaction }: TransactionEventArgs) {
    const list = transaction && pending.get(transaction);
    if (!list) return;
    pending.delete(transaction);
    // Not awaited: the request that committed shouldn't wait for mail.
    for (const task of list) void run(task);
  },
};

/** Registers the subscriber once per ORM; tasks of rolled-back transactions are dropped with them. */
export function installAfterCommit(orm: MikroORM): void {
  orm.em.getEventManager().registerSubscriber(subscriber);
}
