import { DataTypes } from 'sequelize';

// Column definitions the model files share.

/** NUMERIC columns travel as strings; wrap them in Decimal before any arithmetic. */
export type Numeric = string;

export const id = { type: DataTypes.UUID, defaultValue: DataTypes.UUIDV4, primaryKey: true };
/** A reference to another row (a uuid), required unless `allowNull`. */
export const ref = (allowNull = false) => ({ type: DataTypes.UUID, allowNull });
export const shopId = ref();
/*
 * Timestamps, each naming its column: Sequelize writes the column name into the definition object
 * it is given, so one object shared by createdAt and updatedAt made both write created_at.
 */
export const createdAt = { type: DataTypes.DATE, allowNull: false, field: 'created_at' };
export const updatedAt = { type: DataTypes.DATE, allowNull: false, field: 'updated_at' };
/** Required text, empty by default; VARCHAR(length) when a length is given. */
export const text = (length?: number) => ({ type: length ? DataTypes.STRING(length) : DataTypes.TEXT, allowNull: false, defaultValue: '' });
