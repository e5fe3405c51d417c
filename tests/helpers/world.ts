// One shop with one of everything a route can name by id: customer, unit, jobs in several states,
// a sent and an approved quote, a payment, a reading, hours, a spec sheet, catalog entries, a photo
// and an open invite. Every text carries the shop's marker, so a test can tell whether a reply
// leaked anything of this shop.
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import * as actuals from '../../src/lib/server/actuals';
import * as catalog from '../../src/lib/server/catalog';
import { Customer } from '../../src/lib/server/db/models';
import * as invites from '../../src/lib/server/invites';
import * as payments from '../../src/lib/server/payments';
import * as photos from '../../src/lib/server/photos';
import * as quotes from '../../src/lib/server/quotes';
import * as readings from '../../src/lib/server/readings';
import * as specs from '../../src/lib/server/specs';
import { createShop, type ShopFixture } from './fixtures';
import { sentQuote } from './quotes';
import { actor, createJob } from './shopdata';

export interface World {
	shop: ShopFixture;
	/** A word found in this shop's names and texts and nowhere else. */
	marker: string;
	customerId: string;
	unitId: string;
	/** Checked in, with a reading and a photo shown to the customer. */
	jobId: string;
	/** Quoted: its customer link is open. */
	quotedJobId: string;
	token: string;
	/** Approved, with a counter payment and hours. */
	approvedJobId: string;
	approvedToken: string;
	paymentId: string;
	labourEntryId: string;
	readingId: string;
	photoId: string;
	specId: string;
	partId: string;
	labourId: string;
	replacementId: string;
	inviteToken: string;
	inviteEmail: string;
}

/** A tiny real JPEG: uploads judge the bytes, not the name. */
export function tinyJpeg(): Promise<Buffer> {
	return sharp({ create: { width: 16, height: 12, channels: 3, background: '#7a5c3e' } }).jpeg().toBuffer();
}

export async function buildWorld(label: string, origin = 'http://127.0.0.1'): Promise<World> {
	const shop = await createShop(label);
	const marker = `Zq${randomUUID().replace(/-/g, '').slice(0, 10)}`;
	const owner = { ...actor(shop, 'owner'), name: `Owner ${marker}` };

	const made = await createJob(shop, { customerName: `Customer ${marker}`, serial: `SN-${marker}`, complaint: `No output ${marker}` });
	await Customer.update({ notes: `Notes ${marker}` }, { where: { id: made.customer.id } });

	const quoted = await sentQuote(shop);
	const approved = await sentQuote(shop);
	await quotes.decide(approved.token, {
		decision: 'approved', optionIndex: 0, signerName: `Signer ${marker}`, reason: '', clientAddress: '127.0.0.1', userAgent: 'world'
	});
	const paid = await payments.recordCounterPayment(owner, approved.job.id, { kind: 'deposit', method: 'cash', amount: '10.00', reference: '' });
	const hours = await actuals.recordHours(owner, approved.job.id, { technicianId: shop.staff.technician.id, hours: '1.50', workedOn: undefined, note: `Hours ${marker}` });

	const reading = await readings.add(owner, made.job.id, { specItemId: undefined, label: `Stator ${marker}`, unit: 'Ω', value: '1.2', note: '' });
	const photo = await photos.add(owner, made.job.id, { bytes: await tinyJpeg(), name: 'bench.jpg' }, `Photo ${marker}`);
	await photos.update(owner, made.job.id, photo.id, { showCustomer: true });

	const sheet = await specs.save(owner, null, {
		name: `Sheet ${marker}`, appliesTo: '', notes: '',
		items: [{ label: 'Stator winding', unit: 'Ω', min: '0.5', max: '2.0', openAbove: null, shortBelow: null, running: false, source: '' }]
	});
	const partId = await catalog.create(owner, 'parts', { number: `P-${marker}`, description: `Brush set ${marker}`, cost: '12.50', supplier: '', stock: '3', specialOrder: 'no' });
	const labourId = await catalog.create(owner, 'labour', { name: `Replace brushes ${marker}`, hours: '0.80' });
	const replacementId = await catalog.create(owner, 'replacements', {
		kind: 'portable', name: `Unit ${marker}`, ratedWatts: '5500', priceNew: '899.00', lifeYears: '10', lifeHours: '1500'
	});

	const inviteEmail = `invitee.${marker.toLowerCase()}@shop.example`;
	const { token: inviteToken } = await invites.create(owner, { email: inviteEmail, role: 'technician' }, origin);

	return {
		shop, marker,
		customerId: made.customer.id, unitId: made.unit.id, jobId: made.job.id,
		quotedJobId: quoted.job.id, token: quoted.token,
		approvedJobId: approved.job.id, approvedToken: approved.token,
		paymentId: paid.payment.id, labourEntryId: hours.id,
		readingId: reading.id, photoId: photo.id, specId: sheet.id,
		partId, labourId, replacementId, inviteToken, inviteEmail
	};
}
