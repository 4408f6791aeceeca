import type PgBoss from 'pg-boss';
import { computeJobExpirySeconds, digestCron } from '../config';

/**
 * Every queue the product uses, with its retry policy. The web side only enqueues; workers
 * (`npm run worker`) create the queues and run the handlers. Names are ours.
 */
export const QUEUES = {
	/** A no-op round trip through the queue, used by the wiring test. */
	ping: 'system.ping',
	computeRevision: 'revision.compute',
	rejudgeClass: 'verdict.rejudge-class',
	rejudgeLoops: 'verdict.rejudge-loops',
	notifyVerdict: 'verdict.notify',
	/** Scheduled: deviations whose start came or whose expiry passed are applied, loops re-judged. */
	expireDeviations: 'deviation.expire',
	/** Scheduled daily: a digest (outbox row + send job) for every lead who chose one. */
	openDigests: 'verdict.digest',
	sendDigest: 'verdict.send-digest',
	reconcileStorage: 'storage.reconcile',
	renderReport: 'report.render'
} as const;

export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

/** Read when a queue is created or a worker starts (the compute expiry is configurable). */
export const queueOptions = (): Record<QueueName, Omit<PgBoss.Queue, 'name'>> => ({
	[QUEUES.ping]: { retryLimit: 2, retryDelay: 1, retryBackoff: true, expireInSeconds: 60 },
	// A worker killed mid-job leaves the job active until it expires; then pg-boss retries it.
	[QUEUES.computeRevision]: { retryLimit: 5, retryDelay: 2, retryBackoff: true, expireInSeconds: computeJobExpirySeconds() },
	[QUEUES.rejudgeClass]: { retryLimit: 5, retryDelay: 2, retryBackoff: true, expireInSeconds: 300 },
	[QUEUES.rejudgeLoops]: { retryLimit: 5, retryDelay: 2, retryBackoff: true, expireInSeconds: 300 },
	// Mail outages can last: keep trying for about a day before giving up (the outbox row stays).
	[QUEUES.notifyVerdict]: { retryLimit: 30, retryDelay: 30, retryBackoff: true, expireInSeconds: 60 },
	[QUEUES.expireDeviations]: { retryLimit: 2, retryDelay: 10, expireInSeconds: 300 },
	[QUEUES.reconcileStorage]: { retryLimit: 2, retryDelay: 10, expireInSeconds: 600 },
	[QUEUES.openDigests]: { retryLimit: 5, retryDelay: 60, retryBackoff: true, expireInSeconds: 300 },
	[QUEUES.sendDigest]: { retryLimit: 30, retryDelay: 30, retryBackoff: true, expireInSeconds: 60 },
	// A render that failed (storage down, a model gone) is tried twice more; the row shows the message.
	[QUEUES.renderReport]: { retryLimit: 2, retryDelay: 5, retryBackoff: true, expireInSeconds: 600 }
});

/** Cron schedules of the periodic jobs (run by whichever worker's clock fires first). */
export const schedules = (): Partial<Record<QueueName, string>> => ({
	[QUEUES.expireDeviations]: '* * * * *',
	[QUEUES.reconcileStorage]: '*/5 * * * *',
	[QUEUES.openDigests]: digestCron()
});

export interface PingData {
	/** Echoed back in the job's output so a caller can recognise its own job. */
	nonce: string;
}
export interface ComputeRevisionData {
	revisionId: string;
}
export interface RejudgeClassData {
	classId: string;
	cause: 'requirement' | 'reconcile';
}
export interface RejudgeLoopsData {
	loopIds: string[];
	cause: 'deviation' | 'expiry' | 'reconcile';
}
export interface NotifyVerdictData {
	eventId: string;
}
export interface SendDigestData {
	digestId: string;
}
export interface RenderReportData {
	reportId: string;
}
