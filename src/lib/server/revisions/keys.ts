/** Object keys are named by the server from ids only: no user input ever reaches a key. */
export const MODEL_PREFIX = 'models/';

export function modelKey(loopId: string, revisionId: string): string {
	return `${MODEL_PREFIX}${loopId}/${revisionId}`;
}

const KEY = /^models\/([0-9a-f-]{36})\/([0-9a-f-]{36})$/;

/** The ids inside a key we issued, or null for any other key. */
export function parseModelKey(key: string): { loopId: string; revisionId: string } | null {
	const m = KEY.exec(key);
	return m ? { loopId: m[1], revisionId: m[2] } : null;
}
