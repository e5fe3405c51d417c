import { createHash, randomBytes } from 'node:crypto';
import { Op } from 'sequelize';
import { z } from 'zod';
import { ROLE_LABELS, ROLE_NAMES, capitalise, manageableRoles, roleWithArticle, type RoleName } from '../roles';
import * as audit from './audit';
import { lucia } from './auth/lucia';
import { hashPassword } from './auth/password';
import { db } from './db';
import { Invite, Shop, User } from './db/models';
import { UserError } from './errors';
import * as outbox from './mail/outbox';
import * as templates from './mail/templates';
import { emailField, emailTaken, nameField, newPasswordField } from './users';

export const INVITE_DAYS = 7;

export const inviteSchema = z.object({
	email: emailField,
	role: z.enum(ROLE_NAMES, { error: 'Choose a role.' })
});

export const acceptSchema = z.object({ name: nameField, password: newPasswordField });

const hashToken = (token: string) => createHash('sha256').update(token).digest('hex');

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
	name?: string;
}

export const inviteLink = (origin: string, token: string) => `${origin}/invite/${token}`;

/**
 * Creates a single-use invite and queues the e-mail carrying its link, both or neither. Returns the
 * token for the link (only its hash is kept); `origin` is the app's public address.
 */
export async function create(actor: Actor, input: z.infer<typeof inviteSchema>, origin: string) {
	if (!manageableRoles(actor.role).includes(input.role)) {
		throw new UserError(`${capitalise(roleWithArticle(actor.role))} cannot invite ${roleWithArticle(input.role)}.`, 'role');
	}
	if (await emailTaken(input.email)) throw new UserError('Someone with this e-mail already has an account.', 'email');
	const shop = await Shop.findByPk(actor.shopId, { attributes: ['name', 'phone', 'email', 'address'], rejectOnEmpty: true });
	const token = randomBytes(32).toString('base64url');
	const invite = await db().transaction(async (transaction) => {
		const created = await Invite.create(
			{
				shopId: actor.shopId,
				email: input.email,
				role: input.role,
				tokenHash: hashToken(token),
				invitedBy: actor.id,
				expiresAt: new Date(Date.now() + INVITE_DAYS * 86_400_000)
			},
			{ transaction }
		);
		const mail = templates.staffInvite({
			shop,
			inviterName: actor.name?.trim() || `The ${ROLE_LABELS[actor.role].toLowerCase()} of ${shop.name}`,
			roleLabel: ROLE_LABELS[input.role],
			link: inviteLink(origin, token),
			validDays: INVITE_DAYS
		});
		await outbox.enqueue({ to: input.email, ...mail }, { shopId: actor.shopId, kind: 'staff_invite' }, transaction);
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'invite.created', entity: 'invite', entityId: created.id, detail: { role: input.role } },
			transaction
		);
		return created;
	});
	return { invite, token };
}

export function listOpen(shopId: string) {
	return Invite.findAll({
		where: { shopId, usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } },
		order: [['createdAt', 'DESC']]
	});
}

export async function revoke(actor: Actor, inviteId: string) {
	const invite = await Invite.findOne({ where: { id: inviteId, shopId: actor.shopId, usedAt: null, revokedAt: null } });
	if (!invite) throw new UserError('No such open invite in your shop.');
	if (!manageableRoles(actor.role).includes(invite.role)) throw new UserError(`${capitalise(roleWithArticle(actor.role))} cannot withdraw that invite.`);
	invite.revokedAt = new Date();
	await invite.save();
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'invite.revoked', entity: 'invite', entityId: invite.id });
}

/** The open invite behind a token, with its shop's name, or null when used, withdrawn or expired. */
export async function findOpen(token: string) {
	if (typeof token !== 'string' || token.length < 20 || token.length > 100) return null;
	const invite = await Invite.findOne({
		where: { tokenHash: hashToken(token), usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } }
	});
	if (!invite) return null;
	const shop = await Shop.findByPk(invite.shopId, { attributes: ['name'] });
	return { invite, shopName: shop?.name ?? '' };
}

/** Uses the invite once: creates the account and signs it in. */
export async function accept(token: string, input: z.infer<typeof acceptSchema>) {
	const passwordHash = await hashPassword(input.password);
	const user = await db().transaction(async (transaction) => {
		const invite = await Invite.findOne({
			where: { tokenHash: hashToken(token), usedAt: null, revokedAt: null, expiresAt: { [Op.gt]: new Date() } },
			lock: transaction.LOCK.UPDATE,
			transaction
		});
		if (!invite) throw new UserError('This invite link has been used, withdrawn or has expired. Ask for a new one.');
		if (await emailTaken(invite.email)) throw new UserError('An account with this e-mail already exists. Sign in instead.');
		invite.usedAt = new Date();
		await invite.save({ transaction });
		const created = await User.create(
			{ shopId: invite.shopId, email: invite.email, name: input.name, role: invite.role, passwordHash },
			{ transaction }
		);
		await audit.record({ shopId: invite.shopId, userId: created.id, action: 'invite.accepted', entity: 'user', entityId: created.id }, transaction);
		return created;
	});
	return lucia.createSession(user.id, {});
}
