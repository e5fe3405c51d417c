import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';

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
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

const id = { type: DataTypes.UUID, defaultValue: DataTypes.UUIDV4, primaryKey: true };
const shopId = { type: DataTypes.UUID, allowNull: false };
const createdAt = { type: DataTypes.DATE, allowNull: false };

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
			createdAt,
			updatedAt: createdAt
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
			updatedAt: createdAt
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
			createdAt,
			updatedAt: createdAt
		},
		{ sequelize, tableName: 'customers' }
	);

	Shop.hasMany(User, { foreignKey: 'shopId' });
	User.belongsTo(Shop, { foreignKey: 'shopId' });
	Session.belongsTo(User, { foreignKey: 'userId' });
}
