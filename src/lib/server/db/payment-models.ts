import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';
import { createdAt, id, ref, type Numeric, updatedAt } from './columns';
import type { Job, Quote, Shop, User } from './models';

export const PAYMENT_KINDS = ['deposit', 'balance'] as const;
export type PaymentKind = (typeof PAYMENT_KINDS)[number];
export const PAYMENT_METHODS = ['card', 'cash', 'terminal', 'cheque'] as const;
export type PaymentMethod = (typeof PAYMENT_METHODS)[number];
export const PAYMENT_STATUSES = ['pending', 'paid', 'failed', 'refunded', 'partially_refunded'] as const;
export type PaymentStatus = (typeof PAYMENT_STATUSES)[number];
export const REFUND_STATUSES = ['pending', 'succeeded', 'failed'] as const;
export type RefundStatus = (typeof REFUND_STATUSES)[number];

export class Payment extends Model<InferAttributes<Payment>, InferCreationAttributes<Payment>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare quoteId: ForeignKey<Quote['id']> | null;
	declare kind: PaymentKind;
	declare method: PaymentMethod;
	declare amount: Numeric;
	declare currency: string;
	declare refundedAmount: CreationOptional<Numeric>;
	declare status: CreationOptional<PaymentStatus>;
	/** Set for card payments: the Stripe Checkout Session that collects them. */
	declare checkoutSessionId: CreationOptional<string | null>;
	declare paymentIntentId: CreationOptional<string | null>;
	/** Receipt, terminal slip or cheque number for counter payments. */
	declare reference: CreationOptional<string>;
	/** The last thing that went wrong (a declined card, an expired page), in the customer's words. */
	declare lastError: CreationOptional<string | null>;
	declare createdBy: ForeignKey<User['id']> | null;
	declare paidAt: CreationOptional<Date | null>;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class Refund extends Model<InferAttributes<Refund>, InferCreationAttributes<Refund>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare paymentId: ForeignKey<Payment['id']>;
	declare amount: Numeric;
	declare currency: string;
	declare reason: string;
	declare stripeRefundId: CreationOptional<string | null>;
	declare status: CreationOptional<RefundStatus>;
	declare createdBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
	declare updatedAt: CreationOptional<Date>;
}

export class PaymentEvent extends Model<InferAttributes<PaymentEvent>, InferCreationAttributes<PaymentEvent>> {
	declare id: CreationOptional<string>;
	declare stripeEventId: string;
	declare type: string;
	declare payload: Record<string, unknown>;
	/** Null when the event matched nothing of ours (it is then only in the log and this table). */
	declare shopId: ForeignKey<Shop['id']> | null;
	declare paymentId: ForeignKey<Payment['id']> | null;
	declare receivedAt: CreationOptional<Date>;
	declare processedAt: CreationOptional<Date | null>;
	declare flagged: CreationOptional<boolean>;
	declare flagReason: CreationOptional<string | null>;
	declare resolvedAt: CreationOptional<Date | null>;
	declare resolvedBy: ForeignKey<User['id']> | null;
}

let initialised = false;

/** Binds the payment models to a connection; called once by db() after initModels. */
export function initPaymentModels(sequelize: Sequelize): void {
	if (initialised) return;
	initialised = true;
	const money = { type: DataTypes.DECIMAL(14, 4), allowNull: false };
	Payment.init(
		{
			id,
			shopId: ref(),
			jobId: ref(),
			quoteId: ref(true),
			kind: { type: DataTypes.STRING(10), allowNull: false },
			method: { type: DataTypes.STRING(10), allowNull: false },
			amount: money,
			currency: { type: DataTypes.CHAR(3), allowNull: false },
			refundedAmount: { ...money, defaultValue: '0' },
			status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'pending' },
			checkoutSessionId: { type: DataTypes.STRING(255), allowNull: true },
			paymentIntentId: { type: DataTypes.STRING(255), allowNull: true },
			reference: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
			lastError: { type: DataTypes.STRING(500), allowNull: true },
			createdBy: ref(true),
			paidAt: { type: DataTypes.DATE, allowNull: true },
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'payments' }
	);
	Refund.init(
		{
			id,
			shopId: ref(),
			paymentId: ref(),
			amount: money,
			currency: { type: DataTypes.CHAR(3), allowNull: false },
			reason: { type: DataTypes.STRING(500), allowNull: false },
			stripeRefundId: { type: DataTypes.STRING(255), allowNull: true },
			status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'succeeded' },
			createdBy: ref(true),
			createdAt,
			updatedAt
		},
		{ sequelize, tableName: 'refunds' }
	);
	PaymentEvent.init(
		{
			id,
			stripeEventId: { type: DataTypes.STRING(255), allowNull: false },
			type: { type: DataTypes.STRING(100), allowNull: false },
			payload: { type: DataTypes.JSONB, allowNull: false },
			shopId: ref(true),
			paymentId: ref(true),
			receivedAt: { type: DataTypes.DATE, allowNull: false, defaultValue: DataTypes.NOW },
			processedAt: { type: DataTypes.DATE, allowNull: true },
			flagged: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
			flagReason: { type: DataTypes.STRING(500), allowNull: true },
			resolvedAt: { type: DataTypes.DATE, allowNull: true },
			resolvedBy: ref(true)
		},
		{ sequelize, tableName: 'payment_events', timestamps: false }
	);
}
