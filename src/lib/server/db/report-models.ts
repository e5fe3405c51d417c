import {
	DataTypes,
	Model,
	type CreationOptional,
	type ForeignKey,
	type InferAttributes,
	type InferCreationAttributes,
	type Sequelize
} from 'sequelize';
import { createdAt, id, ref, type Numeric } from './columns';
import type { Job, Quote, Shop, UnitKind, User } from './models';

/** Hours a technician actually spent on a job. */
export class JobLabour extends Model<InferAttributes<JobLabour>, InferCreationAttributes<JobLabour>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare technicianId: ForeignKey<User['id']>;
	declare hours: Numeric;
	declare workedOn: CreationOptional<string>;
	declare note: CreationOptional<string>;
	declare recordedBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
}

/** A part used on a job beyond what the approved quote listed, at the shop's cost. */
export class JobExtraPart extends Model<InferAttributes<JobExtraPart>, InferCreationAttributes<JobExtraPart>> {
	declare id: CreationOptional<string>;
	declare shopId: ForeignKey<Shop['id']>;
	declare jobId: ForeignKey<Job['id']>;
	declare description: string;
	declare quantity: Numeric;
	declare unitCost: Numeric;
	/** quantity × unit cost rounded to the cent; computed by the database. */
	declare lineCost: CreationOptional<Numeric>;
	declare recordedBy: ForeignKey<User['id']> | null;
	declare createdAt: CreationOptional<Date>;
}

/** One quoted job as the reports count it; written only by the database's triggers. */
export class JobOutcome extends Model<InferAttributes<JobOutcome>, InferCreationAttributes<JobOutcome>> {
	declare jobId: ForeignKey<Job['id']>;
	declare shopId: ForeignKey<Shop['id']>;
	declare quoteId: ForeignKey<Quote['id']>;
	declare jobNumber: number;
	declare technicianId: ForeignKey<User['id']> | null;
	declare unitKind: UnitKind;
	declare firstSentAt: Date;
	declare versionsSent: number;
	declare decision: 'approved' | 'declined' | null;
	declare decidedAt: Date | null;
	declare outcome: 'repaired' | 'replaced' | 'declined' | null;
	declare optionLabel: string | null;
	declare currency: string | null;
	declare minorDigits: number;
	declare revenue: Numeric;
	declare cost: Numeric;
	declare grossProfit: Numeric;
	declare partsSell: Numeric;
	declare partsCost: Numeric;
	declare labourSell: Numeric;
	declare labourCost: Numeric;
	declare billedHours: Numeric;
	declare labourCostRate: Numeric;
	declare actualHours: Numeric | null;
	declare technicianHours: Record<string, number | string>;
	declare extraPartsCost: Numeric;
	declare actualLabourCost: Numeric;
	declare actualGrossProfit: Numeric;
	declare marginLost: Numeric;
	declare refreshedAt: Date;
}

let initialised = false;

/** Binds the report models to a connection; called once by db(). */
export function initReportModels(sequelize: Sequelize): void {
	if (initialised) return;
	initialised = true;
	const numeric = (allowNull = false) => ({ type: DataTypes.DECIMAL, allowNull });
	JobLabour.init(
		{
			id,
			shopId: ref(),
			jobId: ref(),
			technicianId: ref(),
			hours: { type: DataTypes.DECIMAL(6, 2), allowNull: false },
			workedOn: { type: DataTypes.DATEONLY, allowNull: false, defaultValue: DataTypes.NOW },
			note: { type: DataTypes.STRING(300), allowNull: false, defaultValue: '' },
			recordedBy: ref(true),
			createdAt
		},
		{ sequelize, tableName: 'job_labour', updatedAt: false }
	);
	JobExtraPart.init(
		{
			id,
			shopId: ref(),
			jobId: ref(),
			description: { type: DataTypes.STRING(200), allowNull: false },
			quantity: { type: DataTypes.DECIMAL(10, 2), allowNull: false },
			unitCost: { type: DataTypes.DECIMAL(12, 2), allowNull: false },
			lineCost: { type: DataTypes.DECIMAL(14, 2), allowNull: true },
			recordedBy: ref(true),
			createdAt
		},
		{ sequelize, tableName: 'job_extra_parts', updatedAt: false }
	);
	JobOutcome.init(
		{
			jobId: { type: DataTypes.UUID, primaryKey: true },
			shopId: ref(),
			quoteId: ref(),
			jobNumber: { type: DataTypes.INTEGER, allowNull: false },
			technicianId: ref(true),
			unitKind: { type: DataTypes.STRING(20), allowNull: false },
			firstSentAt: { type: DataTypes.DATE, allowNull: false },
			versionsSent: { type: DataTypes.INTEGER, allowNull: false },
			decision: { type: DataTypes.STRING(10), allowNull: true },
			decidedAt: { type: DataTypes.DATE, allowNull: true },
			outcome: { type: DataTypes.STRING(10), allowNull: true },
			optionLabel: { type: DataTypes.STRING(120), allowNull: true },
			currency: { type: DataTypes.CHAR(3), allowNull: true },
			minorDigits: { type: DataTypes.INTEGER, allowNull: false },
			revenue: numeric(),
			cost: numeric(),
			grossProfit: numeric(),
			partsSell: numeric(),
			partsCost: numeric(),
			labourSell: numeric(),
			labourCost: numeric(),
			billedHours: numeric(),
			labourCostRate: numeric(),
			actualHours: numeric(true),
			technicianHours: { type: DataTypes.JSONB, allowNull: false },
			extraPartsCost: numeric(),
			actualLabourCost: numeric(),
			actualGrossProfit: numeric(),
			marginLost: numeric(),
			refreshedAt: { type: DataTypes.DATE, allowNull: false }
		},
		{ sequelize, tableName: 'job_outcomes', timestamps: false }
	);
}
