import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';
import { createdAt, id, ref, shopId, text, updatedAt } from './columns';
import type { Job, Shop } from './models';

export const OUTBOX_STATUSES = ['queued', 'sending', 'sent', 'failed'] as const;
export type OutboxStatus = (typeof OUTBOX_STATUSES)[number];

/** An attachment as stored: the bytes in base64 inside the row's jsonb. */
export interface StoredAttachment {
	filename: string;
	contentType: string;
	content: string;
}

export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']> | null;
	declare kind: string;
	declare toAddress: string;
	declare fromName: CreationOptional<string>;
	declare replyTo: CreationOptional<string>;
	declare subject: string;
	declare textBody: string;
	declare htmlBody: CreationOptional<string>;
	declare attachments: CreationOptional<StoredAttachment[]>;
	/** The Message-ID header, fixed when queued so every retry carries the same one. */
	declare messageId: string;
	declare status: CreationOptional<OutboxStatus>;
	declare attempts: CreationOptional<number>;
	/** When queued: the earliest next try. When sending: the end of the claim. */
	declare nextAttemptAt: CreationOptional<Date>;
	declare lastError: CreationOptional<string | null>;
	declare lastErrorCode: CreationOptional<string | null>;
	declare smtpResponse: CreationOptional<string | null>;
	declare sentAt: CreationOptional<Date | null>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

let initialised = false;

/** Binds the outbox model to a connection; called once by db() after initModels. */
export function initOutboxModel(sequelize: Sequelize): void {
	if (initialised) return;
	initialised = true;
	OutboxMessage.init(
		{
			id,
			shopId,
			jobId: ref(true),
			kind: { type: DataTypes.STRING(40), allowNull: false },
			toAddress: { type: DataTypes.STRING(254), allowNull: false },
			fromName: text(120),
			replyTo: text(254),
			subject: { type: DataTypes.STRING(300), allowNull: false },
			textBody: { type: DataTypes.TEXT, allowNull: false },
			htmlBody: text(),
			attachments: { type: DataTypes.JSONB, allowNull: false, defaultValue: [] },
			messageId: { type: DataTypes.STRING(200), allowNull: false, unique: true },
			status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
			attempts: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			nextAttemptAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
			lastError: { type: DataTypes.TEXT, allowNull: true },
			lastErrorCode: { type: DataTypes.STRING(20), allowNull: true },
			smtpResponse: { type: DataTypes.STRING(300), allowNull: true },
			sentAt: { type: DataTypes.DATE, allowNull: true },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'outbox_messages' }
	);
}
