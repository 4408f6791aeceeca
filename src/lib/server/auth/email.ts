/** E-mail addresses are compared and stored lower-cased and trimmed. */
export function normalizeEmail(email: string): string {
	return email.trim().toLowerCase();
}
