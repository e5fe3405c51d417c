// The words of every e-mail, as a plain-text body and a simple HTML body. Pure: amounts and dates
// arrive already formatted (money by the pricing engine's formatter), links as absolute URLs.

export interface ShopContact {
	name: string;
	phone?: string | null;
	email?: string | null;
	address?: string | null;
}

export interface MailContent {
	subject: string;
	text: string;
	html: string;
	/** Shown as the sender's name; the address is MAIL_FROM. */
	fromName: string;
	/** Where a reply goes: the shop for customer mail, the customer for shop notices. */
	replyTo?: string;
}

export const SAFETY_CAUTION =
	'Run generators outdoors only, far from doors and windows; never back-feed a building except through a transfer switch installed by a licensed electrician.';

type Block =
	| { kind: 'paragraph'; text: string }
	| { kind: 'facts'; rows: [label: string, value: string][] }
	| { kind: 'button'; label: string; href: string }
	| { kind: 'caution' };

const paragraph = (text: string): Block => ({ kind: 'paragraph', text });

function escapeHtml(value: string): string {
	return value.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

function checkLink(href: string): string {
	const url = new URL(href);
	if (url.protocol !== 'https:' && url.protocol !== 'http:') throw new Error(`An e-mail link must be http(s): ${href}`);
	return url.href;
}

function contactLines(shop: ShopContact): string[] {
	return [shop.name, shop.address, shop.phone, shop.email].map((s) => (s ?? '').trim()).filter(Boolean);
}

function renderText(greeting: string, blocks: Block[], shop: ShopContact, footer: string): string {
	const parts = [greeting];
	for (const block of blocks) {
		if (block.kind === 'paragraph') parts.push(block.text);
		else if (block.kind === 'facts') parts.push(block.rows.map(([label, value]) => `${label}: ${value}`).join('\n'));
		else if (block.kind === 'button') parts.push(`${block.label}:\n${block.href}`);
		else parts.push(`Safety: ${SAFETY_CAUTION}`);
	}
	parts.push(['-- ', ...contactLines(shop)].join('\n'));
	parts.push(footer);
	return parts.join('\n\n') + '\n';
}

const FONT = "font-family:-apple-system,'Segoe UI',Roboto,Helvetica,Arial,sans-serif";

function renderHtml(title: string, greeting: string, blocks: Block[], shop: ShopContact, footer: string): string {
	const body = blocks
		.map((block) => {
			switch (block.kind) {
				case 'paragraph':
					return `<p style="margin:0 0 16px">${escapeHtml(block.text)}</p>`;
				case 'facts':
					return (
						'<table role="presentation" style="border-collapse:collapse;margin:0 0 16px;width:100%">' +
						block.rows
							.map(
								([label, value]) =>
									`<tr><td style="padding:4px 12px 4px 0;color:#5b5248;vertical-align:top;width:40%">${escapeHtml(label)}</td>` +
									`<td style="padding:4px 0;font-weight:600;vertical-align:top;overflow-wrap:anywhere">${escapeHtml(value)}</td></tr>`
							)
							.join('') +
						'</table>'
					);
				case 'button':
					return (
						`<p style="margin:8px 0 16px"><a href="${escapeHtml(block.href)}" style="display:inline-block;background:#b4562a;color:#ffffff;` +
						`padding:12px 20px;border-radius:6px;text-decoration:none;font-weight:600">${escapeHtml(block.label)}</a></p>` +
						`<p style="margin:0 0 16px;font-size:13px;color:#5b5248">If the button does not work, copy this address into your browser:<br>` +
						`<a href="${escapeHtml(block.href)}" style="color:#8a3f1c;word-break:break-all">${escapeHtml(block.href)}</a></p>`
					);
				case 'caution':
					return (
						'<p style="margin:0 0 16px;padding:12px;border:1px solid #d9a441;background:#fbf3df;border-radius:6px;font-size:14px">' +
						`<strong>Safety:</strong> ${escapeHtml(SAFETY_CAUTION)}</p>`
					);
			}
		})
		.join('\n');
	const contact = contactLines(shop).map(escapeHtml).join('<br>');
	return `<!doctype html>
<html lang="en">
<head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1"><title>${escapeHtml(title)}</title></head>
<body style="margin:0;padding:0;background:#f6f3ee;color:#211d1a;${FONT};font-size:16px;line-height:1.5">
<div style="max-width:560px;margin:0 auto;padding:24px 16px">
<p style="margin:0 0 20px;font-size:18px;font-weight:700">${escapeHtml(shop.name)}</p>
<div style="background:#ffffff;border:1px solid #e4ddd3;border-radius:8px;padding:24px">
<p style="margin:0 0 16px">${escapeHtml(greeting)}</p>
${body}
</div>
<p style="margin:20px 0 0;font-size:13px;color:#5b5248">${contact}</p>
<p style="margin:8px 0 0;font-size:12px;color:#7a7067">${escapeHtml(footer)}</p>
</div>
</body>
</html>
`;
}

function compose(options: {
	subject: string;
	greeting: string;
	blocks: Block[];
	shop: ShopContact;
	footer: string;
	fromName: string;
	replyTo?: string | null;
}): MailContent {
	return {
		subject: options.subject,
		text: renderText(options.greeting, options.blocks, options.shop, options.footer),
		html: renderHtml(options.subject, options.greeting, options.blocks, options.shop, options.footer),
		fromName: options.fromName,
		...(options.replyTo?.trim() ? { replyTo: options.replyTo.trim() } : {})
	};
}

/** A message from the shop to its customer: greeted by name, signed and answered by the shop. */
function toCustomer(shop: ShopContact, customerName: string, subject: string, blocks: Block[]): MailContent {
	return compose({ subject, greeting: hello(customerName), blocks, shop, footer: customerFooter(shop), fromName: shop.name, replyTo: shop.email });
}

/** A block of label–value rows; a row without a value is left out. */
function facts(...rows: [string, string | null | undefined | false][]): Block {
	return { kind: 'facts', rows: rows.filter((row): row is [string, string] => Boolean(row[1])) };
}

const customerFooter = (shop: ShopContact) =>
	`You receive this because ${shop.name} is working on your equipment. Reply to this e-mail or call the shop with any question.`;

const hello = (name: string) => (name.trim() ? `Hello ${name.trim()},` : 'Hello,');

/** To a new teammate: the single-use link that creates their account. */
export function staffInvite(input: { shop: ShopContact; inviterName: string; roleLabel: string; link: string; validDays: number }): MailContent {
	const { shop } = input;
	return compose({
		subject: `${input.inviterName} invited you to join ${shop.name} on Mendwise`,
		greeting: 'Hello,',
		blocks: [
			paragraph(`${input.inviterName} invited you to join ${shop.name} as ${articled(input.roleLabel)}. Mendwise is where the shop checks units in, records bench readings and prices repairs.`),
			{ kind: 'button', label: 'Accept the invite', href: checkLink(input.link) },
			paragraph(`The link works once and expires in ${input.validDays} days. If you did not expect this invite, ignore this e-mail: no account is made until the link is used.`)
		],
		shop,
		footer: `Sent by Mendwise for ${shop.name}.`,
		fromName: shop.name,
		replyTo: shop.email
	});
}

/** To the customer: the estimate is ready to review and approve (the PDF is attached by the caller). */
export function quoteSent(input: {
	shop: ShopContact;
	customerName: string;
	jobNumber: number | string;
	unitLabel: string;
	link: string;
	/** Every option with its total, so no one price stands for the estimate. */
	options?: { label: string; total: string; recommended: boolean }[];
	validUntil?: string | null;
}): MailContent {
	const { shop } = input;
	return toCustomer(shop, input.customerName, `Your estimate for job #${input.jobNumber} from ${shop.name}`, [
		paragraph(`We have finished diagnosing your ${input.unitLabel} and written up what it takes to put it right. The estimate is attached as a PDF and waiting for you online, where you can compare the options, including whether repair or replacement makes more sense.`),
		facts(
			['Job', `#${input.jobNumber}`],
			['Unit', input.unitLabel],
			...(input.options ?? []).map((o): [string, string] => [o.recommended ? `${o.label} (our recommendation)` : o.label, o.total]),
			['Valid until', input.validUntil]
		),
		{ kind: 'button', label: 'Review and approve the estimate', href: checkLink(input.link) },
		paragraph('No work beyond the diagnosis starts until you approve an option in writing.'),
		{ kind: 'caution' }
	]);
}

/** To the customer after they sign: what they approved (the signed PDF is attached by the caller). */
export function approvalConfirmation(input: {
	shop: ShopContact;
	customerName: string;
	jobNumber: number | string;
	unitLabel: string;
	optionLabel: string;
	total: string;
	deposit?: string | null;
	signedBy: string;
	signedAt: string;
	link?: string | null;
}): MailContent {
	const { shop } = input;
	const blocks: Block[] = [
		paragraph(`Thank you. We have your signed approval for job #${input.jobNumber}; a copy of the signed estimate is attached as a PDF for your records.`),
		facts(
			['Job', `#${input.jobNumber}`],
			['Unit', input.unitLabel],
			['You approved', input.optionLabel],
			['Total', input.total],
			['Deposit', input.deposit],
			['Signed by', input.signedBy],
			['Signed on', input.signedAt]
		)
	];
	if (input.link) blocks.push({ kind: 'button', label: 'See your approved estimate', href: checkLink(input.link) });
	blocks.push(
		paragraph('We will let you know when your unit is ready. If anything found during the repair would change the price, we ask you first.'),
		{ kind: 'caution' }
	);
	return toCustomer(shop, input.customerName, `Approved: job #${input.jobNumber} at ${shop.name}`, blocks);
}

/** To the shop: the customer approved an option or declined the estimate. */
export function decisionNotice(input: {
	shop: ShopContact;
	decision: 'approved' | 'declined';
	customerName: string;
	customerEmail?: string | null;
	jobNumber: number | string;
	unitLabel: string;
	optionLabel?: string | null;
	total?: string | null;
	signedBy: string;
	decidedAt: string;
	jobLink: string;
	note?: string | null;
}): MailContent {
	const { shop } = input;
	const approved = input.decision === 'approved';
	return compose({
		subject: approved
			? `Job #${input.jobNumber}: ${input.customerName} approved ${input.optionLabel ?? 'the estimate'}`
			: `Job #${input.jobNumber}: ${input.customerName} declined the estimate`,
		greeting: 'Hello,',
		blocks: [
			paragraph(
				approved
					? `${input.customerName} approved the estimate for job #${input.jobNumber}. The job can move to repair; order any special-order parts once the deposit is in.`
					: `${input.customerName} declined the estimate for job #${input.jobNumber}. Arrange the pick-up of the unit and settle any diagnostic fee.`
			),
			facts(
				['Job', `#${input.jobNumber}`],
				['Customer', input.customerName],
				['Unit', input.unitLabel],
				['Option', approved && input.optionLabel],
				['Total', approved && input.total],
				[approved ? 'Signed by' : 'Declined by', input.signedBy],
				['When', input.decidedAt],
				['Customer note', input.note?.trim()]
			),
			{ kind: 'button', label: 'Open the job', href: checkLink(input.jobLink) }
		],
		shop,
		footer: `Sent by Mendwise to ${shop.name}.`,
		fromName: 'Mendwise',
		replyTo: input.customerEmail
	});
}

/** To the customer: a payment was received. */
export function paymentReceipt(input: {
	shop: ShopContact;
	customerName: string;
	jobNumber: number | string;
	unitLabel: string;
	amount: string;
	paidAt: string;
	method?: string | null;
	reference: string;
	balanceDue?: string | null;
	link?: string | null;
}): MailContent {
	const { shop } = input;
	const blocks: Block[] = [
		paragraph(`Thank you for your payment of ${input.amount} for job #${input.jobNumber}. Keep this e-mail as your receipt.`),
		facts(
			['Job', `#${input.jobNumber}`],
			['Unit', input.unitLabel],
			['Amount paid', input.amount],
			['Paid on', input.paidAt],
			['Method', input.method],
			['Reference', input.reference],
			['Balance still due', input.balanceDue]
		)
	];
	if (input.link) blocks.push({ kind: 'button', label: 'See the job and your payments', href: checkLink(input.link) });
	blocks.push({ kind: 'caution' });
	return toCustomer(shop, input.customerName, `Receipt: ${input.amount} paid for job #${input.jobNumber} at ${shop.name}`, blocks);
}

/** To the customer: the repair is done and the balance can be paid online. */
export function balancePaymentLink(input: {
	shop: ShopContact;
	customerName: string;
	jobNumber: number | string;
	unitLabel: string;
	balance: string;
	link: string;
	pickupNote?: string | null;
}): MailContent {
	const { shop } = input;
	const blocks: Block[] = [
		paragraph(`Your ${input.unitLabel} is repaired and tested. The balance for job #${input.jobNumber} is ${input.balance}; you can pay it online before you come by.`),
		facts(['Job', `#${input.jobNumber}`], ['Unit', input.unitLabel], ['Balance due', input.balance]),
		{ kind: 'button', label: `Pay ${input.balance}`, href: checkLink(input.link) }
	];
	if (input.pickupNote?.trim()) blocks.push(paragraph(input.pickupNote.trim()));
	blocks.push({ kind: 'caution' });
	return toCustomer(shop, input.customerName, `Job #${input.jobNumber} is ready: balance of ${input.balance} at ${shop.name}`, blocks);
}

function articled(label: string): string {
	const lower = label.toLowerCase();
	return (/^[aeiou]/.test(lower) ? 'an ' : 'a ') + lower;
}
