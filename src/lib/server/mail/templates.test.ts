import { describe, expect, it } from 'vitest';
import * as templates from './templates';

const shop = { name: 'Larkspur Engine & Generator Repair', phone: '555-0148', email: 'desk@larkspur.example', address: '40 Millrace Lane' };

const all = {
	invite: templates.staffInvite({ shop, inviterName: 'Ora Pell', roleLabel: 'Technician', link: 'https://app.example/invite/tok', validDays: 7 }),
	quote: templates.quoteSent({ shop, customerName: 'Tamsin Yarrow', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000', link: 'https://app.example/q/1',
		options: [{ label: 'Replace the rotor', total: '$1,204.50', recommended: true }, { label: 'New Brevik Power BP-7000', total: '$1,149.00', recommended: false }], validUntil: '30 Dec 2026' }),
	approval: templates.approvalConfirmation({
		shop, customerName: 'Tamsin Yarrow', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000', optionLabel: 'Replace the rotor', total: '$1,204.50',
		deposit: '$300.00', signedBy: 'Tamsin Yarrow', signedAt: '2 Dec 2026, 10:14', link: 'https://app.example/q/1'
	}),
	approved: templates.decisionNotice({
		shop, decision: 'approved', customerName: 'Tamsin Yarrow', customerEmail: 'tamsin@home.example', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000',
		optionLabel: 'Replace the rotor', total: '$1,204.50', signedBy: 'Tamsin Yarrow', decidedAt: '2 Dec 2026, 10:14', jobLink: 'https://app.example/jobs/9'
	}),
	declined: templates.decisionNotice({
		shop, decision: 'declined', customerName: 'Tamsin Yarrow', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000', signedBy: 'Tamsin Yarrow',
		decidedAt: '2 Dec 2026, 10:14', jobLink: 'https://app.example/jobs/9', note: 'Buying a new one.'
	}),
	receipt: templates.paymentReceipt({
		shop, customerName: 'Tamsin Yarrow', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000', amount: '$300.00', paidAt: '2 Dec 2026', method: 'Card',
		reference: 'pi_123', balanceDue: '$904.50'
	}),
	balance: templates.balancePaymentLink({ shop, customerName: 'Tamsin Yarrow', jobNumber: 1042, unitLabel: 'Brevik Power BP-7000', balance: '$904.50', link: 'https://app.example/pay/1' })
};

describe('e-mail templates', () => {
	it('carry the shop’s name and contact in both bodies of every message', () => {
		for (const mail of Object.values(all)) {
			for (const body of [mail.text, mail.html]) {
				expect(body).toContain('555-0148');
				expect(body).toContain('40 Millrace Lane');
				expect(body).toContain('desk@larkspur.example');
			}
			expect(mail.text).toContain(shop.name);
			expect(mail.html).toContain('Larkspur Engine &amp; Generator Repair');
			expect(mail.subject).not.toMatch(/[\r\n]/);
		}
	});

	it('show the safety caution in messages to customers about their unit, not in staff mail', () => {
		for (const mail of [all.quote, all.approval, all.receipt, all.balance]) {
			expect(mail.text).toContain(templates.SAFETY_CAUTION);
			expect(mail.html).toContain('never back-feed a building except through a transfer switch installed by a licensed electrician.');
		}
		for (const mail of [all.invite, all.approved, all.declined]) expect(mail.text).not.toContain(templates.SAFETY_CAUTION);
	});

	it('put every link in the text body and as a clickable link in the HTML body', () => {
		expect(all.invite.text).toContain('https://app.example/invite/tok');
		expect(all.invite.html).toContain('href="https://app.example/invite/tok"');
		expect(all.quote.html).toContain('href="https://app.example/q/1"');
		expect(all.balance.text).toContain('Pay $904.50:\nhttps://app.example/pay/1');
		expect(all.approved.html).toContain('href="https://app.example/jobs/9"');
	});

	it('list every option of the estimate with its total, the recommended one marked', () => {
		expect(all.quote.text).toMatch(/Replace the rotor \(our recommendation\):?\s+\$1,204\.50/);
		expect(all.quote.text).toMatch(/New Brevik Power BP-7000:?\s+\$1,149\.00/);
		expect(all.quote.text).not.toContain('Quoted total');
	});

	it('say what was decided, with replies going to the right person', () => {
		expect(all.approved.subject).toBe('Job #1042: Tamsin Yarrow approved Replace the rotor');
		expect(all.approved.replyTo).toBe('tamsin@home.example');
		expect(all.declined.subject).toBe('Job #1042: Tamsin Yarrow declined the estimate');
		expect(all.declined.text).toContain('Customer note: Buying a new one.');
		expect(all.declined.replyTo).toBeUndefined();
		expect(all.quote.replyTo).toBe('desk@larkspur.example');
		expect(all.quote.fromName).toBe(shop.name);
		expect(all.approval.text).toContain('Deposit: $300.00');
		expect(all.receipt.text).toContain('Balance still due: $904.50');
		expect(all.invite.text).toContain('Ora Pell invited you to join Larkspur Engine & Generator Repair as a technician.');
	});

	it('escape what people typed and refuse links that are not web addresses', () => {
		const mail = templates.quoteSent({ shop: { name: '<b>Shop</b>' }, customerName: 'Ann "<script>"', jobNumber: 1, unitLabel: 'x', link: 'https://app.example/q' });
		expect(mail.html).not.toContain('<script>');
		expect(mail.html).toContain('Ann &quot;&lt;script&gt;&quot;');
		expect(mail.html).toContain('&lt;b&gt;Shop&lt;/b&gt;');
		expect(() => templates.quoteSent({ shop, customerName: 'x', jobNumber: 1, unitLabel: 'x', link: 'javascript:alert(1)' })).toThrow('http(s)');
	});
});
