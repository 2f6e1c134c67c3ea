/**
 * Where to go after signing in: only a path on this very origin. The target is resolved against
 * the app's origin with `new URL` (as a browser would), and anything a browser might read as
 * another host is refused: backslashes (`/\evil.example`), control characters such as a tab
 * (`/%09/evil.example`), protocol-relative `//host` and absolute URLs. Null means "use the
 * role's home".
 */
export function safeRedirectTarget(
	target: string | null | undefined,
	origin: string
): string | null {
	if (!target || !target.startsWith('/') || target.startsWith('//')) return null;
	// eslint-disable-next-line no-control-regex
	if (/[\\\u0000-\u001f\u007f\s]/.test(target)) return null;
	let resolved: URL;
	let base: URL;
	try {
		base = new URL(origin);
		resolved = new URL(target, base);
	} catch {
		return null;
	}
	if (resolved.origin !== base.origin || !resolved.pathname.startsWith('/')) return null;
	return resolved.pathname + resolved.search + resolved.hash;
}
