import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';
import type { CONDITIONS, FUELS, JobStatus, ReadingResult, UnitKind, VOLTAGES } from '../../domain';
import { createdAt, id, ref, shopId, text, type Numeric, updatedAt } from './columns';

export const ROLES = ['owner', 'manager', 'writer', 'technician'] as const;
export type Role = (typeof ROLES)[number];

export class Shop extends Model<InferAttributes<Shop>, InferCreationAttributes<Shop>> {
	declare id: CreationOptional<string>;
	declare name: string;
	declare phone: CreationOptional<string>;
	declare email: CreationOptional<string>;
	declare address: CreationOptional<string>;
	declare currency: CreationOptional<string>;
	declare settings: CreationOptional<Record<string, unknown>>;
	declare nextJobNumber: CreationOptional<number>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare email: string;
	declare name: string;
	declare role: Role;
	declare passwordHash: string;
	declare active: CreationOptional<boolean>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class Session extends Model<InferAttributes<Session>, InferCreationAttributes<Session>> {
	/** SHA-256 of the token in the cookie; the token itself is never stored. */
	declare id: string;
	declare userId: ForeignKey<User['id']>;
	declare expiresAt: Date;
	declare createdAt: CreationOptional<Date>;
}

export class Invite extends Model<InferAttributes<Invite>, InferCreationAttributes<Invite>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare email: string;
	declare role: Role;
	declare tokenHash: string;
	declare invitedBy: ForeignKey<User['id']>;
	declare expiresAt: Date;
	declare usedAt: CreationOptional<Date | null>;
	declare revokedAt: CreationOptional<Date | null>;
	declare createdAt: CreationOptional<Date>;
}

export class SignInAttempt extends Model<InferAttributes<SignInAttempt>, InferCreationAttributes<SignInAttempt>> {
	declare id: CreationOptional<number>;
	declare email: string;
	declare address: string;
	declare succeeded: boolean;
	declare createdAt: CreationOptional<Date>;
}

export class AuditEvent extends Model<InferAttributes<AuditEvent>, InferCreationAttributes<AuditEvent>> {
	declare id: CreationOptional<number>;
	declare shopId: ForeignKey<Shop['id']>;
	declare userId: ForeignKey<User['id']> | null;
	declare action: string;
	declare entity: string;
	declare entityId: string | null;
	declare detail: CreationOptional<Record<string, unknown>>;
	declare createdAt: CreationOptional<Date>;
}

export class Customer extends Model<InferAttributes<Customer>, InferCreationAttributes<Customer>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare name: string;
	declare phone: CreationOptional<string>;
	declare email: CreationOptional<string>;
	declare address: CreationOptional<string>;
	declare notes: CreationOptional<string>;
	declare searchText: CreationOptional<string>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export { CONDITIONS, FUELS, JOB_STATUSES, READING_RESULTS, UNIT_KINDS, VOLTAGES } from '../../domain';
export type { JobStatus, ReadingResult, UnitKind } from '../../domain';

export class Unit extends Model<InferAttributes<Unit>, InferCreationAttributes<Unit>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare customerId: ForeignKey<Customer['id']>;
	declare kind: UnitKind;
	declare maker: CreationOptional<string>;
	declare model: CreationOptional<string>;
	declare serial: CreationOptional<string>;
	declare runningWatts: CreationOptional<number | null>;
	declare startingWatts: CreationOptional<number | null>;
	declare voltage: CreationOptional<(typeof VOLTAGES)[number]>;
	declare fuel: CreationOptional<(typeof FUELS)[number]>;
	declare engineHours: CreationOptional<Numeric | null>;
	declare yearBought: CreationOptional<number | null>;
	declare pricePaid: CreationOptional<Numeric | null>;
	declare condition: CreationOptional<(typeof CONDITIONS)[number]>;
	declare notes: CreationOptional<string>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class SpecSheet extends Model<InferAttributes<SpecSheet, { omit: 'getItems' }>, InferCreationAttributes<SpecSheet, { omit: 'getItems' }>> {
	declare getItems: import('sequelize').HasManyGetAssociationsMixin<SpecItem>;
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare name: string;
	declare appliesTo: CreationOptional<string>;
	declare notes: CreationOptional<string>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class SpecItem extends Model<InferAttributes<SpecItem>, InferCreationAttributes<SpecItem>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare sheetId: ForeignKey<SpecSheet['id']>;
	declare position: CreationOptional<number>;
	declare label: string;
	declare unit: string;
	declare minValue: CreationOptional<Numeric | null>;
	declare maxValue: CreationOptional<Numeric | null>;
	declare openAbove: CreationOptional<Numeric | null>;
	declare shortBelow: CreationOptional<Numeric | null>;
	declare running: CreationOptional<boolean>;
	declare source: CreationOptional<string>;
}

export class Job extends Model<InferAttributes<Job>, InferCreationAttributes<Job>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare number: number;
	declare unitId: ForeignKey<Unit['id']>;
	declare customerId: ForeignKey<Customer['id']>;
	declare complaint: string;
	declare status: CreationOptional<JobStatus>;
	declare technicianId: ForeignKey<User['id']> | null;
	declare diagnosticFee: CreationOptional<Numeric>;
	declare promisedOn: CreationOptional<string | null>;
	declare specSheetId: ForeignKey<SpecSheet['id']> | null;
	declare failedComponent: CreationOptional<string>;
	declare findings: CreationOptional<string>;
	declare searchText: CreationOptional<string>;
	declare lockVersion: CreationOptional<number>;
	declare createdBy: ForeignKey<User['id']> | null;
	declare statusChangedAt: CreationOptional<Date>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class Reading extends Model<InferAttributes<Reading>, InferCreationAttributes<Reading>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare specItemId: ForeignKey<SpecItem['id']> | null;
	declare label: string;
	declare unit: string;
	declare value: Numeric | null;
	declare overRange: CreationOptional<boolean>;
	declare minValue: Numeric | null;
	declare maxValue: Numeric | null;
	declare result: ReadingResult;
	declare note: CreationOptional<string>;
	declare takenBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
}

export class Photo extends Model<InferAttributes<Photo>, InferCreationAttributes<Photo>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare caption: CreationOptional<string>;
	declare showCustomer: CreationOptional<boolean>;
	declare mime: string;
	declare width: number;
	declare height: number;
	declare sizeBytes: number;
	declare data: Buffer;
	declare thumb: Buffer;
	declare uploadedBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
}

export class Part extends Model<InferAttributes<Part>, InferCreationAttributes<Part>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare number: string;
	declare description: string;
	declare cost: Numeric;
	declare supplier: CreationOptional<string>;
	declare stock: CreationOptional<number>;
	declare specialOrder: CreationOptional<boolean>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class LabourOperation extends Model<InferAttributes<LabourOperation>, InferCreationAttributes<LabourOperation>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare name: string;
	declare hours: Numeric;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class ReplacementUnit extends Model<InferAttributes<ReplacementUnit>, InferCreationAttributes<ReplacementUnit>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare kind: UnitKind;
	declare name: string;
	declare ratedWatts: number;
	declare priceNew: Numeric;
	declare lifeYears: Numeric;
	declare lifeHours: Numeric;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class Quote extends Model<InferAttributes<Quote>, InferCreationAttributes<Quote>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare draft: Record<string, unknown>;
	declare lockVersion: CreationOptional<number>;
	declare sentVersions: CreationOptional<number>;
	declare editedSinceSend: CreationOptional<boolean>;
	declare updatedBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class QuoteVersion extends Model<InferAttributes<QuoteVersion>, InferCreationAttributes<QuoteVersion>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare quoteId: ForeignKey<Quote['id']>;
	declare number: number;
	declare content: Record<string, unknown>;
	declare result: Record<string, unknown>;
	declare contentHash: string;
	declare currency: string;
	declare validUntil: string;
	declare sentBy: ForeignKey<User['id']> | null;
	declare sentAt: CreationOptional<Date>;
}

export class QuoteLink extends Model<InferAttributes<QuoteLink>, InferCreationAttributes<QuoteLink>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare quoteId: ForeignKey<Quote['id']>;
	declare versionId: ForeignKey<QuoteVersion['id']>;
	declare tokenHash: string;
	declare expiresAt: Date;
	declare revokedAt: CreationOptional<Date | null>;
	declare createdAt: CreationOptional<Date>;
}

export class Approval extends Model<InferAttributes<Approval>, InferCreationAttributes<Approval>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare quoteId: ForeignKey<Quote['id']>;
	declare versionId: ForeignKey<QuoteVersion['id']>;
	declare decision: 'approved' | 'declined';
	declare optionIndex: number | null;
	declare optionLabel: string | null;
	declare signerName: string | null;
	declare reason: CreationOptional<string>;
	declare clientAddress: string;
	declare userAgent: CreationOptional<string>;
	declare versionHash: string;
	declare createdAt: CreationOptional<Date>;
}

let initialised = false;

/** Binds the models to a connection; called once by db(). */
export function initModels(sequelize: Sequelize): void {
	if (initialised) return;
	initialised = true;
	Shop.init(
		{
			id,
			name: { type: DataTypes.STRING(120), allowNull: false },
			phone: { type: DataTypes.STRING(40), allowNull: false, defaultValue: '' },
			email: { type: DataTypes.STRING(254), allowNull: false, defaultValue: '' },
			address: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
			currency: { type: DataTypes.CHAR(3), allowNull: false, defaultValue: 'USD' },
			settings: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
			nextJobNumber: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 1001 },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'shops' }
	);
	User.init(
		{
			id,
			shopId,
			email: { type: DataTypes.STRING(254), allowNull: false },
			name: { type: DataTypes.STRING(120), allowNull: false },
			role: { type: DataTypes.STRING(20), allowNull: false },
			passwordHash: { type: DataTypes.TEXT, allowNull: false },
			active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'users' }
	);
	Session.init(
		{
			id: { type: DataTypes.STRING(64), primaryKey: true },
			userId: { type: DataTypes.UUID, allowNull: false },
			expiresAt: { type: DataTypes.DATE, allowNull: false },
			createdAt
		},
		{ sequelize, tableName: 'sessions', updatedAt: false }
	);
	Invite.init(
		{
			id,
			shopId,
			email: { type: DataTypes.STRING(254), allowNull: false },
			role: { type: DataTypes.STRING(20), allowNull: false },
			tokenHash: { type: DataTypes.STRING(64), allowNull: false, unique: true },
			invitedBy: { type: DataTypes.UUID, allowNull: false },
			expiresAt: { type: DataTypes.DATE, allowNull: false },
			usedAt: { type: DataTypes.DATE, allowNull: true },
			revokedAt: { type: DataTypes.DATE, allowNull: true },
			createdAt
		},
		{ sequelize, tableName: 'invites', updatedAt: false }
	);
	SignInAttempt.init(
		{
			id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
			email: { type: DataTypes.STRING(254), allowNull: false },
			address: { type: DataTypes.STRING(100), allowNull: false },
			succeeded: { type: DataTypes.BOOLEAN, allowNull: false },
			createdAt
		},
		{ sequelize, tableName: 'sign_in_attempts', updatedAt: false }
	);
	AuditEvent.init(
		{
			id: { type: DataTypes.BIGINT, autoIncrement: true, primaryKey: true },
			shopId,
			userId: { type: DataTypes.UUID, allowNull: true },
			action: { type: DataTypes.STRING(60), allowNull: false },
			entity: { type: DataTypes.STRING(40), allowNull: false },
			entityId: { type: DataTypes.STRING(64), allowNull: true },
			detail: { type: DataTypes.JSONB, allowNull: false, defaultValue: {} },
			createdAt
		},
		{ sequelize, tableName: 'audit_events', updatedAt: false }
	);

	Customer.init(
		{
			id,
			shopId,
			name: { type: DataTypes.STRING(120), allowNull: false },
			phone: { type: DataTypes.STRING(40), allowNull: false, defaultValue: '' },
			email: { type: DataTypes.STRING(254), allowNull: false, defaultValue: '' },
			address: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
			notes: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
			searchText: { type: DataTypes.TEXT, allowNull: false, defaultValue: '' },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'customers' }
	);
	const numeric = (p: number, s: number, allowNull = true) => ({ type: DataTypes.DECIMAL(p, s), allowNull });
	Unit.init(
		{
			id,
			shopId,
			customerId: ref(),
			kind: { type: DataTypes.STRING(20), allowNull: false },
			maker: text(80),
			model: text(80),
			serial: text(80),
			runningWatts: { type: DataTypes.INTEGER, allowNull: true },
			startingWatts: { type: DataTypes.INTEGER, allowNull: true },
			voltage: { type: DataTypes.STRING(10), allowNull: false, defaultValue: '120/240' },
			fuel: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'gasoline' },
			engineHours: numeric(10, 1),
			yearBought: { type: DataTypes.INTEGER, allowNull: true },
			pricePaid: numeric(12, 2),
			condition: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'good' },
			notes: text(),
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'units' }
	);
	SpecSheet.init(
		{ id, shopId, name: { type: DataTypes.STRING(120), allowNull: false }, appliesTo: text(200), notes: text(), createdAt, updatedAt },
		{ sequelize, tableName: 'spec_sheets' }
	);
	SpecItem.init(
		{
			id,
			shopId,
			sheetId: ref(),
			position: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			label: { type: DataTypes.STRING(120), allowNull: false },
			unit: { type: DataTypes.STRING(10), allowNull: false },
			minValue: numeric(14, 4),
			maxValue: numeric(14, 4),
			openAbove: numeric(14, 4),
			shortBelow: numeric(14, 4),
			running: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			source: text(200)
		},
		{ sequelize, tableName: 'spec_items', timestamps: false }
	);
	Job.init(
		{
			id,
			shopId,
			number: { type: DataTypes.INTEGER, allowNull: false },
			unitId: ref(),
			customerId: ref(),
			complaint: { type: DataTypes.TEXT, allowNull: false },
			status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'checked_in' },
			technicianId: ref(true),
			diagnosticFee: { type: DataTypes.DECIMAL(12, 2), allowNull: false, defaultValue: '0' },
			promisedOn: { type: DataTypes.DATEONLY, allowNull: true },
			specSheetId: ref(true),
			failedComponent: text(120),
			findings: text(),
			searchText: text(),
			lockVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			createdBy: ref(true),
			statusChangedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'jobs' }
	);
	Reading.init(
		{
			id,
			shopId,
			jobId: ref(),
			specItemId: ref(true),
			label: { type: DataTypes.STRING(120), allowNull: false },
			unit: { type: DataTypes.STRING(10), allowNull: false },
			value: numeric(14, 4),
			overRange: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			minValue: numeric(14, 4),
			maxValue: numeric(14, 4),
			result: { type: DataTypes.STRING(10), allowNull: false },
			note: text(300),
			takenBy: ref(true),
			createdAt
		},
		{ sequelize, tableName: 'readings', updatedAt: false }
	);
	Photo.init(
		{
			id,
			shopId,
			jobId: ref(),
			caption: text(200),
			showCustomer: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			mime: { type: DataTypes.STRING(30), allowNull: false },
			width: { type: DataTypes.INTEGER, allowNull: false },
			height: { type: DataTypes.INTEGER, allowNull: false },
			sizeBytes: { type: DataTypes.INTEGER, allowNull: false },
			data: { type: DataTypes.BLOB, allowNull: false },
			thumb: { type: DataTypes.BLOB, allowNull: false },
			uploadedBy: ref(true),
			createdAt
		},
		{ sequelize, tableName: 'photos', updatedAt: false }
	);
	Part.init(
		{
			id,
			shopId,
			number: { type: DataTypes.STRING(60), allowNull: false },
			description: { type: DataTypes.STRING(200), allowNull: false },
			cost: numeric(12, 2, false),
			supplier: text(120),
			stock: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			specialOrder: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'parts' }
	);
	LabourOperation.init(
		{ id, shopId, name: { type: DataTypes.STRING(120), allowNull: false }, hours: numeric(6, 2, false), createdAt, updatedAt },
		{ sequelize, tableName: 'labour_operations' }
	);
	ReplacementUnit.init(
		{
			id,
			shopId,
			kind: { type: DataTypes.STRING(20), allowNull: false },
			name: { type: DataTypes.STRING(120), allowNull: false },
			ratedWatts: { type: DataTypes.INTEGER, allowNull: false },
			priceNew: numeric(12, 2, false),
			lifeYears: numeric(5, 1, false),
			lifeHours: numeric(8, 0, false),
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'replacement_units' }
	);

	Quote.init(
		{
			id,
			shopId,
			jobId: ref(),
			draft: { type: DataTypes.JSONB, allowNull: false },
			lockVersion: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			sentVersions: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
			editedSinceSend: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
			updatedBy: ref(true),
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'quotes' }
	);
	QuoteVersion.init(
		{
			id,
			shopId,
			quoteId: ref(),
			number: { type: DataTypes.INTEGER, allowNull: false },
			content: { type: DataTypes.JSONB, allowNull: false },
			result: { type: DataTypes.JSONB, allowNull: false },
			contentHash: { type: DataTypes.CHAR(64), allowNull: false },
			currency: { type: DataTypes.CHAR(3), allowNull: false },
			validUntil: { type: DataTypes.DATEONLY, allowNull: false },
			sentBy: ref(true),
			sentAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW }
		},
		{ sequelize, tableName: 'quote_versions', timestamps: false }
	);
	QuoteLink.init(
		{
			id,
			shopId,
			quoteId: ref(),
			versionId: ref(),
			tokenHash: { type: DataTypes.CHAR(64), allowNull: false },
			expiresAt: { type: DataTypes.DATE, allowNull: false },
			revokedAt: { type: DataTypes.DATE, allowNull: true },
			createdAt
		},
		{ sequelize, tableName: 'quote_links', updatedAt: false }
	);
	Approval.init(
		{
			id,
			shopId,
			quoteId: ref(),
			versionId: ref(),
			decision: { type: DataTypes.STRING(10), allowNull: false },
			optionIndex: { type: DataTypes.INTEGER, allowNull: true },
			optionLabel: { type: DataTypes.STRING(120), allowNull: true },
			signerName: { type: DataTypes.STRING(120), allowNull: true },
			reason: { type: DataTypes.STRING(1000), allowNull: false, defaultValue: '' },
			clientAddress: { type: DataTypes.STRING(100), allowNull: false },
			userAgent: { type: DataTypes.STRING(400), allowNull: false, defaultValue: '' },
			versionHash: { type: DataTypes.CHAR(64), allowNull: false },
			createdAt
		},
		{ sequelize, tableName: 'approvals', updatedAt: false }
	);

	Shop.hasMany(User, { foreignKey: 'shopId' });
	User.belongsTo(Shop, { foreignKey: 'shopId' });
	Session.belongsTo(User, { foreignKey: 'userId' });
	Customer.hasMany(Unit, { foreignKey: 'customerId' });
	Unit.belongsTo(Customer, { foreignKey: 'customerId' });
	Unit.hasMany(Job, { foreignKey: 'unitId' });
	Job.belongsTo(Unit, { foreignKey: 'unitId' });
	Job.belongsTo(Customer, { foreignKey: 'customerId' });
	Job.belongsTo(User, { foreignKey: 'technicianId', as: 'technician' });
	SpecSheet.hasMany(SpecItem, { foreignKey: 'sheetId', as: 'items' });
}
