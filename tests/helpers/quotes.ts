// A priced quote on a job: a repair (alternator head and labour) and a replacement unit.
import * as quotes from '../../src/lib/server/quotes';
import type { ShopFixture } from './fixtures';
import { actor, createJob } from './shopdata';

export function sampleDraft() {
	return {
		unit: { description: 'Harrowgate PG-5500', ageYears: '4', engineHours: '210', lifeYears: '10', lifeHours: '1500', condition: 'good', asIsValue: '60', annualUpkeep: '0' },
		options: [
			{
				label: 'Replace the alternator head',
				kind: 'repair',
				creditDiagnosticFee: true,
				lines: [
					{ kind: 'part', description: 'Alternator head assembly, 5.5 kW', quantity: '1', unitCost: '212.40', specialOrder: true },
					{ kind: 'labour', description: 'Replace alternator head', hours: '2.5' }
				]
			},
			{
				label: 'New 5.5 kW portable',
				kind: 'replacement',
				lines: [{ kind: 'unit', description: 'Harrowgate PG-5500 5.5 kW portable', cost: '640.00', price: '899.00' }],
				lifeYears: '10',
				lifeHours: '1500'
			},
			{ label: 'Decline the repair', kind: 'decline', lines: [{ kind: 'fee', description: 'Diagnostic fee', amount: '89.00', feeType: 'diagnostic' }] }
		]
	};
}

/** A job with a saved draft, sent: returns the customer token as the e-mail would carry it. */
export async function sentQuote(shop: ShopFixture, draft = sampleDraft()) {
	const made = await createJob(shop);
	const { quote } = await quotes.forJob(shop.id, made.job.id);
	await quotes.saveDraft(actor(shop, 'technician'), made.job.id, draft, quote.lockVersion);
	const sent = await quotes.send(actor(shop, 'writer'), made.job.id);
	return { ...made, ...sent };
}
