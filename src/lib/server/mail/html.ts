/** Escapes text for HTML element content and quoted attribute values. */
export function escapeHtml(value: string): string {
	return value
		.replaceAll('&', '&amp;')
		.replaceAll('<', '&lt;')
		.replaceAll('>', '&gt;')
		.replaceAll('"', '&quot;')
		.replaceAll("'", '&#39;');
}

export interface EmailLayout {
	/** Plain text; shown as the heading and the document title. */
	title: string;
	/** Trusted HTML: escape every interpolated value with escapeHtml before passing it in. */
	bodyHtml: string;
	/** Plain text, e.g. why the recipient gets this mail. */
	footerText?: string;
}

const STEEL = '#2b3139';
const AMBER = '#e8711c';
const FONT = "-apple-system, 'Segoe UI', Roboto, Helvetica, Arial, sans-serif";

/**
 * Wraps a message body in Castellan's e-mail frame: steel-grey header with an amber rule, white
 * card, small footer. Tables and inline styles only, because Outlook and most webmail clients
 * drop <style> blocks and ignore flexbox or grid.
 */
export function layoutEmail({ title, bodyHtml, footerText }: EmailLayout): string {
	const footer = footerText
		? `<tr><td style="padding:16px 24px;color:#6b7280;font-size:12px;line-height:1.5;">${escapeHtml(footerText)}</td></tr>`
		: '';
	return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(title)}</title>
</head>
<body style="margin:0;padding:0;background:#f3f4f6;font-family:${FONT};color:#1f2328;">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0" style="background:#f3f4f6;">
<tr><td align="center" style="padding:24px 12px;">
<table role="presentation" width="600" cellpadding="0" cellspacing="0" style="max-width:600px;width:100%;background:#ffffff;border:1px solid #d1d5db;">
<tr><td style="background:${STEEL};color:#ffffff;padding:14px 24px;font-size:18px;font-weight:700;letter-spacing:0.04em;border-bottom:4px solid ${AMBER};">CASTELLAN</td></tr>
<tr><td style="padding:24px 24px 8px;">
<h1 style="margin:0 0 16px;font-size:20px;line-height:1.3;color:${STEEL};">${escapeHtml(title)}</h1>
<div style="font-size:15px;line-height:1.55;">${bodyHtml}</div>
</td></tr>
${footer}
</table>
</td></tr>
</table>
</body>
</html>`;
}
