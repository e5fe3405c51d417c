import { fileTypeFromBuffer } from 'file-type';
import sharp, { type Metadata } from 'sharp';
import { z } from 'zod';
import type { RoleName } from '../roles';
import * as audit from './audit';
import { db } from './db';
import { Job, Photo } from './db/models';
import { isUuid } from './validators';

interface Actor {
	id: string;
	shopId: string;
	role: RoleName;
}

export const MAX_BYTES = 15 * 1024 * 1024;
/** Pixels a picture may claim in its header; refuses decompression bombs before decoding. */
export const MAX_PIXELS = 100_000_000;
export const FULL_LONG_SIDE = 2400;
export const THUMB_LONG_SIDE = 320;
export const CAPTION_MAX = 200;

const ACCEPTED = new Set(['image/jpeg', 'image/png', 'image/webp']);
const HEIF = new Set(['image/heic', 'image/heif', 'image/heic-sequence', 'image/heif-sequence']);
const FULL_MIME = 'image/jpeg';
const THUMB_MIME = 'image/webp';

/** A refusal the person can act on; `notFound` marks a job or photo that is not in their shop. */
export class PhotoError extends Error {
	constructor(
		message: string,
		readonly notFound = false
	) {
		super(message);
	}
}

const notFound = () => new PhotoError('There is no such photo or job in your shop.', true);

export const captionField = z
	.string({ error: 'A caption is text.' })
	.trim()
	.max(CAPTION_MAX, `Keep the caption under ${CAPTION_MAX} characters.`)
	.refine((v) => !/[\u0000-\u0008\u000b-\u001f\u007f]/.test(v), 'The caption has characters that cannot be shown.');

export const updateSchema = z
	.object({
		caption: captionField.optional(),
		showCustomer: z.boolean({ error: 'Say whether the customer sees this photo.' }).optional()
	})
	.strict()
	.refine((v) => v.caption !== undefined || v.showCustomer !== undefined, 'Change the caption or whether the customer sees the photo.');
export type PhotoUpdate = z.infer<typeof updateSchema>;

/** What pages and JSON answers carry about a photo: never the bytes. */
export interface PhotoSummary {
	id: string;
	jobId: string;
	caption: string;
	showCustomer: boolean;
	width: number;
	height: number;
	sizeBytes: number;
	createdAt: string;
}

const SUMMARY_ATTRIBUTES = ['id', 'jobId', 'caption', 'showCustomer', 'width', 'height', 'sizeBytes', 'createdAt'] as const;

function summary(photo: Photo): PhotoSummary {
	return {
		id: photo.id,
		jobId: photo.jobId,
		caption: photo.caption,
		showCustomer: photo.showCustomer,
		width: photo.width,
		height: photo.height,
		sizeBytes: photo.sizeBytes,
		createdAt: photo.createdAt.toISOString()
	};
}

export const photoUrl = (jobId: string, photoId: string) => `/jobs/${jobId}/photos/${photoId}`;
export const thumbUrl = (jobId: string, photoId: string) => `${photoUrl(jobId, photoId)}/thumb`;

/** The JSON answer of the photo routes: what a gallery needs to show and link one photo. */
export function forClient(photo: PhotoSummary) {
	return {
		id: photo.id,
		caption: photo.caption,
		showCustomer: photo.showCustomer,
		width: photo.width,
		height: photo.height,
		url: photoUrl(photo.jobId, photo.id),
		thumbUrl: thumbUrl(photo.jobId, photo.id)
	};
}
export type ClientPhoto = ReturnType<typeof forClient>;

/** Rounded up, so a file just over the limit never reads as exactly the limit. */
const megabytes = (bytes: number) => `${Math.ceil((bytes / (1024 * 1024)) * 10) / 10} MB`;

export async function jobExists(shopId: string, jobId: string): Promise<boolean> {
	return isUuid(jobId) && (await Job.count({ where: { id: jobId, shopId } })) > 0;
}

async function jobOf(shopId: string, jobId: string) {
	const job = isUuid(jobId) ? await Job.findOne({ where: { id: jobId, shopId }, attributes: ['id'] }) : null;
	if (!job) throw notFound();
	return job;
}

const HEIC_MESSAGE =
	'This is a HEIC photo, which the shop cannot read. Set the phone camera to "Most compatible" (JPEG) and take it again, or send it as JPEG.';

/** Decides from the bytes themselves, never from the name or the declared type; true for HEIC/HEIF. */
async function checkPicture(bytes: Buffer): Promise<boolean> {
	if (bytes.length === 0) throw new PhotoError('The file is empty (0 bytes). Choose the photo again.');
	if (bytes.length > MAX_BYTES) {
		throw new PhotoError(`This file is ${megabytes(bytes.length)}; a photo can be at most ${megabytes(MAX_BYTES)}. Send a smaller photo.`);
	}
	const type = await fileTypeFromBuffer(bytes);
	// Phones save HEIC by default; whether it decodes depends on how the image library was built.
	if (type && HEIF.has(type.mime)) return true;
	if (!type || !ACCEPTED.has(type.mime)) {
		const found = type ? ` (this file is ${type.ext.toUpperCase()})` : '';
		throw new PhotoError(`Only JPEG, PNG or WebP photos can be added${found}. Choose a picture taken with a camera or phone.`);
	}
	return false;
}

interface Encoded {
	full: Buffer;
	thumb: Buffer;
	width: number;
	height: number;
}

/** Upright by EXIF, then re-encoded: the output carries no metadata (no GPS, no camera serial). */
async function encode(bytes: Buffer, heif: boolean): Promise<Encoded> {
	const unreadable = heif ? HEIC_MESSAGE : 'The picture cannot be read; it may be damaged or cut short. Try sending it again.';
	const source = () => sharp(bytes, { limitInputPixels: MAX_PIXELS, failOn: 'error' });
	let meta: Metadata;
	try {
		// Only the header is read here, so the pixel count can be judged with a clear message.
		meta = await sharp(bytes, { limitInputPixels: false }).metadata();
	} catch {
		throw new PhotoError(unreadable);
	}
	if (!meta.width || !meta.height) throw new PhotoError(unreadable);
	if (meta.width * meta.height > MAX_PIXELS) {
		throw new PhotoError(`The picture is ${meta.width} × ${meta.height} pixels, more than ${MAX_PIXELS / 1_000_000} megapixels. Take it at the camera's normal size.`);
	}
	try {
		const full = await source()
			.rotate()
			.flatten({ background: '#ffffff' })
			.resize({ width: FULL_LONG_SIDE, height: FULL_LONG_SIDE, fit: 'inside', withoutEnlargement: true })
			.jpeg({ quality: 82, mozjpeg: true })
			.toBuffer({ resolveWithObject: true });
		const thumb = await sharp(full.data)
			.resize({ width: THUMB_LONG_SIDE, height: THUMB_LONG_SIDE, fit: 'inside', withoutEnlargement: true })
			.webp({ quality: 70 })
			.toBuffer();
		return { full: full.data, thumb, width: full.info.width, height: full.info.height };
	} catch {
		throw new PhotoError(unreadable);
	}
}

/** Metadata of a job's photos, oldest first. */
export async function list(shopId: string, jobId: string): Promise<PhotoSummary[]> {
	if (!isUuid(jobId)) return [];
	const rows = await Photo.findAll({ where: { shopId, jobId }, attributes: [...SUMMARY_ATTRIBUTES], order: [['createdAt', 'ASC'], ['id', 'ASC']] });
	return rows.map(summary);
}

/** Only the photos the shop chose to show the customer. */
export async function listForCustomer(shopId: string, jobId: string): Promise<PhotoSummary[]> {
	if (!isUuid(jobId)) return [];
	const rows = await Photo.findAll({
		where: { shopId, jobId, showCustomer: true },
		attributes: [...SUMMARY_ATTRIBUTES],
		order: [['createdAt', 'ASC'], ['id', 'ASC']]
	});
	return rows.map(summary);
}

/**
 * Checks, cleans and stores one uploaded picture. The file name is only echoed (shortened) into
 * the audit trail; it never becomes a path. Nothing is written unless every step succeeds.
 */
export async function add(actor: Actor, jobId: string, file: { bytes: Buffer; name: string }, caption = ''): Promise<PhotoSummary> {
	const job = await jobOf(actor.shopId, jobId);
	const parsedCaption = captionField.safeParse(caption);
	if (!parsedCaption.success) throw new PhotoError(parsedCaption.error.issues[0].message);
	const heif = await checkPicture(file.bytes);
	const encoded = await encode(file.bytes, heif);
	const photo = await db().transaction(async (transaction) => {
		const created = await Photo.create(
			{
				shopId: actor.shopId,
				jobId: job.id,
				caption: parsedCaption.data,
				mime: FULL_MIME,
				width: encoded.width,
				height: encoded.height,
				sizeBytes: encoded.full.length,
				data: encoded.full,
				thumb: encoded.thumb,
				uploadedBy: actor.id
			},
			{ transaction }
		);
		await audit.record(
			{
				shopId: actor.shopId,
				userId: actor.id,
				action: 'photo.added',
				entity: 'photo',
				entityId: created.id,
				detail: { jobId: job.id, fileName: String(file.name ?? '').slice(0, 120), originalBytes: file.bytes.length }
			},
			transaction
		);
		return created;
	});
	return summary(photo);
}

async function photoOf(shopId: string, jobId: string, photoId: string) {
	if (!isUuid(jobId) || !isUuid(photoId)) throw notFound();
	const photo = await Photo.findOne({ where: { id: photoId, jobId, shopId }, attributes: [...SUMMARY_ATTRIBUTES, 'shopId'] });
	if (!photo) throw notFound();
	return photo;
}

export async function update(actor: Actor, jobId: string, photoId: string, input: PhotoUpdate): Promise<PhotoSummary> {
	const photo = await photoOf(actor.shopId, jobId, photoId);
	const changes: Partial<Pick<Photo, 'caption' | 'showCustomer'>> = {};
	if (input.caption !== undefined && input.caption !== photo.caption) changes.caption = input.caption;
	if (input.showCustomer !== undefined && input.showCustomer !== photo.showCustomer) changes.showCustomer = input.showCustomer;
	if (Object.keys(changes).length === 0) return summary(photo);
	await db().transaction(async (transaction) => {
		await Photo.update(changes, { where: { id: photo.id, shopId: actor.shopId }, transaction });
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'photo.updated', entity: 'photo', entityId: photo.id, detail: { jobId, ...changes } },
			transaction
		);
	});
	return summary(Object.assign(photo, changes));
}

export async function remove(actor: Actor, jobId: string, photoId: string): Promise<void> {
	const photo = await photoOf(actor.shopId, jobId, photoId);
	await db().transaction(async (transaction) => {
		await Photo.destroy({ where: { id: photo.id, shopId: actor.shopId }, transaction });
		await audit.record(
			{ shopId: actor.shopId, userId: actor.id, action: 'photo.removed', entity: 'photo', entityId: photo.id, detail: { jobId, caption: photo.caption } },
			transaction
		);
	});
}

export type PhotoKind = 'full' | 'thumb';

export interface PhotoFile {
	bytes: Buffer;
	mime: string;
}

async function readWhere(where: Record<string, unknown>, kind: PhotoKind): Promise<PhotoFile | null> {
	const column = kind === 'thumb' ? 'thumb' : 'data';
	const photo = await Photo.findOne({ where, attributes: ['id', 'mime', column] });
	if (!photo) return null;
	return kind === 'thumb' ? { bytes: photo.thumb, mime: THUMB_MIME } : { bytes: photo.data, mime: photo.mime };
}

/** The stored picture for staff of the photo's shop, or null. */
export async function read(shopId: string, jobId: string, photoId: string, kind: PhotoKind): Promise<PhotoFile | null> {
	if (!isUuid(jobId) || !isUuid(photoId)) return null;
	return readWhere({ id: photoId, jobId, shopId }, kind);
}

/** The stored picture for the customer's link: only when the shop chose to show it. */
export async function readForCustomer(shopId: string, jobId: string, photoId: string, kind: PhotoKind): Promise<PhotoFile | null> {
	if (!isUuid(shopId) || !isUuid(jobId) || !isUuid(photoId)) return null;
	return readWhere({ id: photoId, jobId, shopId, showCustomer: true }, kind);
}
