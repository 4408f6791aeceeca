/**
 * Where to go after signing in. `next` comes from the query string, so it must stay on this
 * site: a sign-in page that forwards anywhere is a phishing tool.
 */
export function safeNext(next: string | null | undefined): string {
	if (!next || !next.startsWith('/') || next.startsWith('//') || next.startsWith('/\\')) return '/';
	// Control characters and backslashes can make a path parse as another host in some browsers.
	// eslint-disable-next-line no-control-regex
	if (/[\u0000-\u001f\\]/.test(next)) return '/';
	// The sign-in pages themselves are pointless targets.
	if (/^\/(signin|signout|reset)(\/|\?|$)/.test(next)) return '/';
	return next;
}
