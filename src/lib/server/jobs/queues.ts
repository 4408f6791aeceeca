import type PgBoss from 'pg-boss';

/**
 * Every queue the product uses, with its retry policy. The web side only enqueues; workers
 * (`npm run worker`) create the queues and run the handlers. Names are ours.
 */
export const QUEUES = {
	/** A no-op round trip through the queue, used by health checks and the wiring test. */
	ping: 'system.ping'
} as const;

export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

export const QUEUE_OPTIONS: Record<QueueName, Omit<PgBoss.Queue, 'name'>> = {
	[QUEUES.ping]: { retryLimit: 2, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 }
};

export interface PingData {
	/** Echoed back in the job's output so a caller can recognise its own job. */
	nonce: string;
}
