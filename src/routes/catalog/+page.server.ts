import { fail } from '@sveltejs/kit';
import type { Actions, PageServerLoad } from './$types';
import { MANAGERS, STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as catalog from '$lib/server/catalog';
import { echo } from '$lib/server/forms';
import * as settings from '$lib/server/settings';

const DONE: Record<string, string> = {
	saved: 'Changes saved.',
	deleted: 'Deleted from the catalog.'
};

/** Only the catalog's own words: `?done=constructor` must not reach Object's prototype. */
const doneMessage = (key: string | null) => (key !== null && Object.hasOwn(DONE, key) ? DONE[key] : null);

export const load: PageServerLoad = async ({ url }) => {
	const user = requireRole(STAFF);
	const q = (url.searchParams.get('q') ?? '').trim().slice(0, 100);
	const [shop, parts, labour, replacements] = await Promise.all([
		settings.get(user.shopId),
		catalog.list(user.shopId, 'parts', q),
		catalog.list(user.shopId, 'labour', q),
		catalog.list(user.shopId, 'replacements', q)
	]);
	const showCost = settings.seesCosts(user.role, shop);
	return {
		q,
		currency: shop.currency,
		canEdit: MANAGERS.includes(user.role),
		showCost,
		pageRows: catalog.PAGE_ROWS,
		maxRows: catalog.MAX_IMPORT_ROWS,
		done: doneMessage(url.searchParams.get('done')),
		parts: {
			total: parts.total,
			rows: parts.rows.map((r) => ({
				id: String(r.id),
				number: String(r.number),
				description: String(r.description),
				supplier: String(r.supplier),
				stock: Number(r.stock),
				specialOrder: Boolean(r.specialOrder),
				...(showCost ? { cost: String(r.cost) } : {})
			}))
		},
		labour: {
			total: labour.total,
			rows: labour.rows.map(catalog.labourView)
		},
		replacements: {
			total: replacements.total,
			rows: replacements.rows.map(catalog.replacementView)
		}
	};
};

function listOf(form: FormData): catalog.ListName | null {
	const value = form.get('list');
	return typeof value === 'string' && catalog.isList(value) ? value : null;
}

export const actions: Actions = {
	add: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const form = await request.formData();
		const list = listOf(form);
		if (!list) return fail(400, { action: 'add', list: '', message: 'Choose parts, labour or replacement units.' });
		try {
			await catalog.create(user, list, catalog.fieldsFromForm(list, form));
			return { action: 'add', list, done: `Added the ${catalog.nounOf(list)}.` };
		} catch (e) {
			if (e instanceof catalog.CatalogError) return fail(400, { action: 'add', list, message: e.message, errors: e.errors, values: echo(form) });
			throw e;
		}
	},
	import: async ({ request }) => {
		const user = requireRole(MANAGERS);
		const form = await request.formData();
		const list = listOf(form);
		if (!list) return fail(400, { action: 'import', list: '', message: 'Choose parts, labour or replacement units.' });
		const file = form.get('file');
		if (!(file instanceof File) || (file.size === 0 && file.name === '')) {
			return fail(400, { action: 'import', list, message: 'Choose a CSV file to import.' });
		}
		if (file.size > catalog.MAX_IMPORT_BYTES) {
			return fail(400, { action: 'import', list, message: `The file is larger than ${catalog.MAX_IMPORT_BYTES / 1024 / 1024} MB. Split it into smaller files and import each.` });
		}
		try {
			const result = await catalog.importCsv(user, list, new Uint8Array(await file.arrayBuffer()));
			const done = `Imported ${file.name || 'the file'}: ${result.added} added, ${result.updated} updated, ${result.unchanged} unchanged.`;
			return { action: 'import', list, done, result };
		} catch (e) {
			if (e instanceof catalog.ImportError) return fail(400, { action: 'import', list, message: e.message, problems: e.problems });
			throw e;
		}
	}
};
