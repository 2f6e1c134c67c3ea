/**
 * The invitation e-mail. The notices outbox only carries die-bound items (its rows need a die),
 * so an invitation is sent at once over the same SMTP settings, and the result — sent, or failed
 * with the reason — is written on the invitation for the admin to see and act on.
 */
import { formatDateTime } from '../../format';
import { plantZone } from '../../plant-time';
import type { DB } from '../db/connect';
import { escapeHtml, layoutEmail } from '../mail/html';
import { createMailer, type Mailer } from '../mail/transport';
import { INVITATION_TTL_HOURS, recordInvitationMail } from './invitations';

export interface InvitationMailInput {
	name: string;
	email: string;
	customerName: string;
	plantName: string;
	/** The plant's footer line (name and contact), from plant-identity.ts. */
	footer?: string;
	link: string;
	expiresAt: string;
}

export function inviteLink(origin: string, token: string): string {
	return `${origin.replace(/\/+$/, '')}/invite/${encodeURIComponent(token)}`;
}

function expiryText(iso: string) {
	return `${formatDateTime(iso)} (${plantZone()})`;
}

export function composeInvitationMail(input: InvitationMailInput) {
	const subject = `${input.plantName}: your access to the tooling of ${input.customerName}`;
	const lines = [
		`Hello ${input.name},`,
		'',
		`${input.plantName} invites you to Castellan, where you can follow the dies ${input.customerName} owns: shots, life used, projected replacement dates, service history and statements.`,
		'',
		'Set your password with this link (it works once):',
		input.link,
		'',
		`The link expires on ${expiryText(input.expiresAt)} (${INVITATION_TTL_HOURS} hours after it was sent). Your sign-in name will be ${input.email}.`,
		'',
		'If you did not expect this e-mail, ignore it: nothing happens without the link.',
		...(input.footer ? ['', '--', input.footer] : [])
	];
	const html = layoutEmail({
		title: `Your access to ${input.customerName}'s tooling`,
		bodyHtml: [
			`<p>Hello ${escapeHtml(input.name)},</p>`,
			`<p>${escapeHtml(input.plantName)} invites you to Castellan, where you can follow the dies ${escapeHtml(input.customerName)} owns: shots, life used, projected replacement dates, service history and statements.</p>`,
			`<p><a href="${escapeHtml(input.link)}" style="display:inline-block;background:#e8711c;color:#ffffff;padding:10px 18px;text-decoration:none;font-weight:600;">Set your password</a></p>`,
			`<p style="font-size:13px;color:#4b5563;">Or paste this address into your browser: ${escapeHtml(input.link)}</p>`,
			`<p>The link works once and expires on ${escapeHtml(expiryText(input.expiresAt))}. Your sign-in name will be ${escapeHtml(input.email)}.</p>`
		].join('\n'),
		footerText: `If you did not expect this e-mail, ignore it: nothing happens without the link.${input.footer ? ` — ${input.footer}` : ''}`
	});
	return { subject, text: lines.join('\n'), html };
}

/** Sends the invitation and records the outcome; never throws for a mail failure. */
export async function sendInvitationMail(
	db: DB,
	mailer: Mailer,
	invitationId: number,
	input: InvitationMailInput
): Promise<{ sent: true } | { sent: false; error: string }> {
	const mail = composeInvitationMail(input);
	try {
		await mailer.send({ to: input.email, ...mail });
		await recordInvitationMail(db, invitationId, 'sent', null);
		return { sent: true };
	} catch (error) {
		const message = error instanceof Error ? error.message : String(error);
		await recordInvitationMail(db, invitationId, 'failed', message);
		return { sent: false, error: message };
	}
}

export interface InvitationMailConfig {
	smtpUrl: string;
	from: string;
	/** Base of the link, e.g. `https://castellan.plant.example`. */
	origin: string;
	plantName: string;
	footer?: string;
}

/**
 * Mails a freshly made (or renewed) invitation over the configured relay and returns the link,
 * which the admin page shows once so the admin can pass it on when the mail did not go out.
 */
export async function deliverInvitation(
	db: DB,
	invitation: {
		id: number;
		token: string;
		name: string;
		email: string;
		customerName: string;
		expiresAt: string;
	},
	config: InvitationMailConfig
) {
	const link = inviteLink(config.origin, invitation.token);
	const mailer = createMailer({ smtpUrl: config.smtpUrl, from: config.from });
	try {
		const result = await sendInvitationMail(db, mailer, invitation.id, {
			name: invitation.name,
			email: invitation.email,
			customerName: invitation.customerName,
			plantName: config.plantName,
			footer: config.footer,
			link,
			expiresAt: invitation.expiresAt
		});
		return { link, email: invitation.email, ...result };
	} finally {
		mailer.close();
	}
}
