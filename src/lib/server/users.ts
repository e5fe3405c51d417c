import { Op } from 'sequelize';
import { z } from 'zod';
import { capitalise, manageableRoles, roleWithArticle, type RoleName } from '../roles';
import * as audit from './audit';
import { UserError } from './errors';
import { lucia } from './auth/lucia';
import { MIN_PASSWORD_LENGTH, burnVerification, hashPassword, verifyPassword } from './auth/password';
import { db } from './db';
import { Shop, User } from './db/models';
import { seedStarterSheets } from './specs';
import * as throttle from './throttle';

export const emailField = z
	.string({ error: 'Enter an e-mail address.' })
	.trim()
	.toLowerCase()
	.max(254, 'That e-mail address is too long.')
	.pipe(z.email({ error: 'Enter a valid e-mail address, like name@example.com.' }));

export const nameField = z
	.string({ error: 'Enter a name.' })
	.trim()
	.min(1, 'Enter a name.')
	.max(120, 'Keep it under 120 characters.');

export const newPasswordField = z
	.string({ error: 'Choose a password.' })
	.min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
	.max(200, 'Use at most 200 characters.');

export const signUpSchema = z.object({
	shopName: nameField,
	name: nameField,
	email: emailField,
	password: newPasswordField
});

export const signInSchema = z.object({
	email: emailField,
	password: z.string({ error: 'Enter your password.' }).min(1, 'Enter your password.').max(200)
});

export { UserError };

export async function emailTaken(email: string): Promise<boolean> {
	const where = { [Op.and]: [db().where(db().fn('lower', db().col('email')), email.toLowerCase()), { active: true }] };
	return (await User.count({ where })) > 0;
}

/** A new shop and its owner, signed in. */
export async function signUp(input: z.infer<typeof signUpSchema>) {
	if (await emailTaken(input.email)) throw new UserError('An account with this e-mail already exists. Sign in instead.', 'email');
	const passwordHash = await hashPassword(input.password);
	const user = await db().transaction(async (transaction) => {
		const shop = await Shop.create({ name: input.shopName }, { transaction });
		const owner = await User.create(
			{ shopId: shop.id, email: input.email, name: input.name, role: 'owner', passwordHash },
			{ transaction }
		);
		await seedStarterSheets(shop.id, transaction);
		await audit.record({ shopId: shop.id, userId: owner.id, action: 'shop.created', entity: 'shop', entityId: shop.id }, transaction);
		return owner;
	});
	return lucia.createSession(user.id, {});
}

export async function signIn(input: z.infer<typeof signInSchema>, address: string) {
	const verdict = await throttle.check(input.email, address);
	if (!verdict.allowed) throw new UserError(verdict.message!);
	const user = await User.findOne({
		where: { [Op.and]: [db().where(db().fn('lower', db().col('email')), input.email), { active: true }] }
	});
	const ok = user ? await verifyPassword(user.passwordHash, input.password) : (await burnVerification(input.password), false);
	await throttle.recordAttempt(input.email, address, ok);
	if (!user || !ok) throw new UserError('That e-mail and password do not match an account.');
	// A fresh session id at every sign-in: a session planted before sign-in is never promoted.
	return lucia.createSession(user.id, {});
}

export async function changePassword(userId: string, current: string, next: string, keepSessionId: string) {
	const user = await User.findByPk(userId);
	if (!user || !(await verifyPassword(user.passwordHash, current))) {
		throw new UserError('Your current password is not right.', 'current');
	}
	user.passwordHash = await hashPassword(next);
	await user.save();
	// Every other device signs in again with the new password.
	await lucia.invalidateUserSessions(user.id);
	await audit.record({ shopId: user.shopId, userId: user.id, action: 'user.password_changed', entity: 'user', entityId: user.id });
	void keepSessionId;
	return lucia.createSession(user.id, {});
}

export function listTeam(shopId: string) {
	return User.findAll({
		where: { shopId, active: true },
		attributes: ['id', 'name', 'email', 'role', 'createdAt'],
		order: [['name', 'ASC']]
	});
}

/** Deactivates a teammate of the same shop and ends their sessions; their history stays. */
export async function remove(actor: { id: string; shopId: string; role: RoleName }, userId: string) {
	const target = await User.findOne({ where: { id: userId, shopId: actor.shopId, active: true } });
	if (!target) throw new UserError('No such teammate in your shop.');
	if (target.id === actor.id) throw new UserError('You cannot remove yourself.');
	if (!manageableRoles(actor.role).includes(target.role)) {
		throw new UserError(`${capitalise(roleWithArticle(actor.role))} cannot remove ${roleWithArticle(target.role)}.`);
	}
	if (target.role === 'owner') {
		const owners = await User.count({ where: { shopId: actor.shopId, role: 'owner', active: true } });
		if (owners <= 1) throw new UserError('A shop keeps at least one owner.');
	}
	target.active = false;
	await target.save();
	await lucia.invalidateUserSessions(target.id);
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'user.removed', entity: 'user', entityId: target.id });
}
