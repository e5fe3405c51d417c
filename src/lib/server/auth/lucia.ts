import { createHash } from 'node:crypto';
import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import { Op } from 'sequelize';
import { Session, User, type Role } from '../db/models';

/** Only a hash of the session token is stored; a leaked table holds no usable cookie. */
export function hashToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

function toDatabaseUser(user: User): DatabaseUser {
	return {
		id: user.id,
		attributes: { shopId: user.shopId, role: user.role, name: user.name, email: user.email }
	};
}

/** lucia's seven adapter methods on the Sequelize models. */
export const sessionAdapter: Adapter = {
	async getSessionAndUser(sessionId) {
		const row = await Session.findByPk(hashToken(sessionId), { include: [{ model: User, required: true }] });
		const user = (row as (Session & { User?: User }) | null)?.User;
		if (!row || !user || !user.active) return [null, null];
		const session: DatabaseSession = { id: sessionId, userId: row.userId, expiresAt: row.expiresAt, attributes: {} };
		return [session, toDatabaseUser(user)];
	},
	async getUserSessions(userId) {
		const rows = await Session.findAll({ where: { userId: String(userId) } });
		return rows.map((r) => ({ id: r.id, userId: r.userId, expiresAt: r.expiresAt, attributes: {} }));
	},
	async setSession(session) {
		await Session.create({ id: hashToken(session.id), userId: String(session.userId), expiresAt: session.expiresAt });
	},
	async updateSessionExpiration(sessionId, expiresAt) {
		await Session.update({ expiresAt }, { where: { id: hashToken(sessionId) } });
	},
	async deleteSession(sessionId) {
		await Session.destroy({ where: { id: hashToken(sessionId) } });
	},
	async deleteUserSessions(userId) {
		await Session.destroy({ where: { userId: String(userId) } });
	},
	async deleteExpiredSessions() {
		await Session.destroy({ where: { expiresAt: { [Op.lte]: new Date() } } });
	}
};

const secureCookies = (process.env.ORIGIN ?? '').startsWith('https://') || process.env.COOKIE_SECURE === 'true';

export const lucia = new Lucia(sessionAdapter, {
	sessionExpiresIn: new TimeSpan(14, 'd'),
	sessionCookie: {
		name: 'mendwise_session',
		attributes: { secure: secureCookies, sameSite: 'lax' }
	},
	getUserAttributes: (attributes) => ({
		shopId: attributes.shopId,
		role: attributes.role,
		name: attributes.name,
		email: attributes.email
	})
});

declare module 'lucia' {
	interface Register {
		Lucia: typeof lucia;
		DatabaseUserAttributes: { shopId: string; role: Role; name: string; email: string };
	}
}
