// A technician on a phone adds photos to a job, one refused with its own message, then captions,
// shares and deletes the stored one — all under the app's content security policy.
import sharp from 'sharp';
import { afterAll, describe, expect, it } from 'vitest';
import { Customer, Job, Photo, Unit } from '../../src/lib/server/db/models';
import { PHONE, closeBrowsers, openBrowser, signIn } from '../helpers/browser';
import { BASE_URL } from '../helpers/client';
import { createShop } from '../helpers/fixtures';

afterAll(closeBrowsers);

describe('photos on a job in the browser', () => {
	it('uploads with a progress bar per file, then captions, shares and deletes', async () => {
		const shop = await createShop('Photos browser');
		const customer = await Customer.create({ shopId: shop.id, name: 'Bettany Quill' });
		const unit = await Unit.create({ shopId: shop.id, customerId: customer.id, kind: 'inverter', maker: 'Brevik Power', model: 'BP-2200i' });
		const job = await Job.create({ shopId: shop.id, number: 8101, unitId: unit.id, customerId: customer.id, complaint: 'Surges under load.' });
		const photo = await sharp({ create: { width: 900, height: 600, channels: 3, background: '#a64b24' } }).jpeg().toBuffer();

		const page = await (await openBrowser(PHONE)).newPage();
		const policyViolations: string[] = [];
		page.on('console', (m) => {
			if (/content security policy/i.test(m.text())) policyViolations.push(m.text());
		});
		await signIn(page, shop.staff.technician);

		await page.goto(`${BASE_URL}/jobs/${job.id}`);
		expect(await page.getByLabel('Take photo').getAttribute('capture')).toBe('environment');
		await page.getByLabel('Choose files').setInputFiles([
			{ name: 'stator-leads.jpg', mimeType: 'image/jpeg', buffer: photo },
			{ name: 'not-a-photo.jpg', mimeType: 'image/jpeg', buffer: Buffer.from('#!/bin/sh\necho hello\n') }
		]);
		await expect(page.getByRole('progressbar', { name: 'stator-leads.jpg' }).count()).resolves.toBe(1);
		
		const refusal = page.getByRole('alert').filter({ hasText: 'Only JPEG, PNG or WebP' });
		await refusal.waitFor();
		await page.getByText('1 added, 1 not added.').waitFor();

		const thumb = page.getByRole('img', { name: 'Photo 1' });
		await thumb.waitFor();
		await page.waitForFunction(() => [...document.querySelectorAll('img')].some((i) => i.src.endsWith('/thumb') && i.naturalWidth > 0));
		expect(await Photo.count({ where: { jobId: job.id } })).toBe(1);

		await page.getByRole('textbox', { name: 'Caption for photo 1' }).fill('Stator leads, insulation cracked');
		await page.getByRole('button', { name: 'Save caption for photo 1' }).click();
		await page.getByText('Caption saved.').waitFor();
		expect((await Photo.findOne({ where: { jobId: job.id } }))!.caption).toBe('Stator leads, insulation cracked');

		await page.getByRole('checkbox', { name: 'Show the customer photo 1' }).check();
		await page.getByText('The customer will see this photo.').waitFor();
		expect((await Photo.findOne({ where: { jobId: job.id } }))!.showCustomer).toBe(true);

		expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(PHONE.width);

		await page.getByRole('button', { name: 'Delete photo 1' }).click();
		await page.getByRole('button', { name: 'Yes, delete photo 1' }).click();
		await page.getByText('No photos yet.').waitFor();
		expect(await Photo.count({ where: { jobId: job.id } })).toBe(0);
		expect(policyViolations).toEqual([]);
	});
});
