import { Op, QueryTypes } from 'sequelize';
import { z } from 'zod';
import * as audit from './audit';
import { db } from './db';
import { Customer, Job, Unit } from './db/models';
import { refreshBoardColumns } from './jobs';
import { isUuid, optionalText, requiredText } from './validators';

export const customerSchema = z.object({
	name: requiredText(120, 'Enter the customer name.'),
	phone: optionalText(40, 'The phone number'),
	email: z
		.string()
		.trim()
		.max(254)
		.optional()
		.transform((v) => v ?? '')
		.refine((v) => v === '' || z.email().safeParse(v).success, 'Enter a valid e-mail address, or leave it empty.'),
	address: optionalText(300, 'The address'),
	notes: optionalText(2000, 'The notes')
});
export type CustomerInput = z.infer<typeof customerSchema>;

interface Actor {
	id: string;
	shopId: string;
}

const searchTextOf = (c: CustomerInput) => [c.name, c.phone, c.email, c.address].join(' ').toLowerCase();

export async function create(actor: Actor, input: CustomerInput) {
	const customer = await Customer.create({ ...input, shopId: actor.shopId, searchText: searchTextOf(input) });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'customer.created', entity: 'customer', entityId: customer.id });
	return customer;
}

export async function update(actor: Actor, id: string, input: CustomerInput) {
	const customer = await get(actor.shopId, id);
	if (!customer) return null;
	await customer.update({ ...input, searchText: searchTextOf(input) });
	await refreshBoardColumns({ shopId: actor.shopId, customerId: id });
	await audit.record({ shopId: actor.shopId, userId: actor.id, action: 'customer.updated', entity: 'customer', entityId: id });
	return customer;
}

export function get(shopId: string, id: string) {
	if (!isUuid(id)) return Promise.resolve(null);
	return Customer.findOne({ where: { id, shopId } });
}

export const CUSTOMERS_PER_PAGE = 50;

/**
 * One page of the shop's customers with the total: those whose name, phone, e-mail or address
 * contains the text typed, by name; newest first when nothing is typed.
 */
export async function search(shopId: string, query: string, page = 1) {
	const q = query.trim().toLowerCase().slice(0, 100);
	const { rows, count } = await Customer.findAndCountAll({
		where: q ? { shopId, searchText: { [Op.like]: `%${q.replace(/[\\%_]/g, (m) => '\\' + m)}%` } } : { shopId },
		order: q ? [['name', 'ASC'], ['id', 'ASC']] : [['createdAt', 'DESC'], ['name', 'ASC'], ['id', 'ASC']],
		limit: CUSTOMERS_PER_PAGE,
		offset: (Math.max(1, Math.floor(page)) - 1) * CUSTOMERS_PER_PAGE,
		attributes: ['id', 'name', 'phone', 'email', 'address']
	});
	return { rows, total: count, pages: Math.max(1, Math.ceil(count / CUSTOMERS_PER_PAGE)) };
}

/** A customer with their units and each unit's jobs (newest first). */
export async function withUnits(shopId: string, id: string) {
	const customer = await get(shopId, id);
	if (!customer) return null;
	const units = await Unit.findAll({ where: { shopId, customerId: id }, order: [['createdAt', 'DESC']] });
	const jobs = units.length
		? await Job.findAll({
				where: { shopId, unitId: units.map((u) => u.id) },
				attributes: ['id', 'number', 'unitId', 'status', 'complaint', 'createdAt'],
				order: [['createdAt', 'DESC']]
			})
		: [];
	return { customer, units, jobs };
}

export async function count(shopId: string): Promise<number> {
	const [row] = await db().query<{ n: number }>('SELECT count(*)::int AS n FROM customers WHERE shop_id = :shopId', {
		replacements: { shopId },
		type: QueryTypes.SELECT
	});
	return row.n;
}
