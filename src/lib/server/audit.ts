import type { Transaction } from 'sequelize';
import { AuditEvent } from './db/models';

export interface AuditEntry {
	shopId: string;
	userId: string | null;
	action: string;
	entity: string;
	entityId?: string | null;
	detail?: Record<string, unknown>;
}

export async function record(entry: AuditEntry, transaction?: Transaction): Promise<void> {
	await AuditEvent.create(
		{
			shopId: entry.shopId,
			userId: entry.userId,
			action: entry.action,
			entity: entry.entity,
			entityId: entry.entityId ?? null,
			detail: entry.detail ?? {}
		},
		{ transaction }
	);
}
