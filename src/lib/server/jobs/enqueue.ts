import type PgBoss from 'pg-boss';
import type { EntityManager } from '@mikro-orm/postgresql';
import { txSender } from './boss';
import type { QueueName } from './queues';
import { transactionalDb } from './transactional';

/**
 * Send a job on the caller's open transaction: it exists exactly when the rows it is about were
 * committed. `tag` lands in pg-boss's singleton_key so the reconcile pass can find a row's job.
 */
export async function enqueueInTx(
	tx: EntityManager,
	name: QueueName,
	data: object,
	options: Omit<PgBoss.SendOptions, 'db'> & { tag?: string } = {}
): Promise<string | null> {
	const { tag, ...rest } = options;
	return txSender().send(name, data, { ...rest, ...(tag ? { singletonKey: tag } : {}), db: transactionalDb(tx) });
}
