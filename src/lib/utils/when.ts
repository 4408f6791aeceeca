/**
 * Timestamps as "2026-03-04 13:07 UTC": the same on the server and in every browser, so the
 * rendered page hydrates without a mismatch and colleagues in other time zones agree.
 */
export function formatWhen(date: Date | string | null | undefined, never = 'never'): string {
	if (!date) return never;
	const d = typeof date === 'string' ? new Date(date) : date;
	return `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}
