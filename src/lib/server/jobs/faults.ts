/**
 * Fault points for tests that kill a worker mid-job (tests/integration/revisions/worker-kill).
 * Off unless HEADROOM_TEST_FAULTS names them, and never on with NODE_ENV=production (config.ts
 * ignores the variable there), so production code paths only pay an array lookup.
 */
import { testFaults } from '../config';

export const FAULTS = {
	/** The compute job stops for good after downloading the model, holding its job active. */
	computeHoldAfterDownload: 'compute-hold-after-download'
} as const;

export type FaultName = (typeof FAULTS)[keyof typeof FAULTS];

/** When the fault is enabled: say so on stdout (the test waits for the line) and never return. */
export async function faultPoint(name: FaultName, detail: string): Promise<void> {
	if (!testFaults().includes(name)) return;
	console.log(`[fault] ${name} ${detail}`);
	await new Promise<never>(() => {});
}
