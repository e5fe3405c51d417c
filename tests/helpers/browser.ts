// Debian's Chromium driven by playwright-core, each context in a fresh profile folder.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import { BASE_URL } from './client';

export const PHONE = { width: 390, height: 844 };
export const DESKTOP = { width: 1280, height: 860 };

const contexts: { context: BrowserContext; dir: string }[] = [];

export async function openBrowser(viewport = DESKTOP): Promise<BrowserContext> {
	const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'mendwise-chromium-'));
	const context = await chromium.launchPersistentContext(dir, {
		executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
		headless: true,
		viewport,
		args: [
			'--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
			'--disable-component-update', '--disable-sync'
		]
	});
	contexts.push({ context, dir });
	return context;
}

export async function closeBrowsers(): Promise<void> {
	for (const { context, dir } of contexts.splice(0)) {
		await context.close();
		fs.rmSync(dir, { recursive: true, force: true });
	}
}

export const screenshotDir = path.resolve(import.meta.dirname, '..', '..', '.data', 'screenshots');

/** Signs in through the form, as a person would, and waits for the home page. */
export async function signIn(page: Page, who: { email: string; password: string }): Promise<void> {
	await page.goto(`${BASE_URL}/signin`);
	await page.getByLabel('E-mail').fill(who.email);
	await page.getByLabel('Password').fill(who.password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await page.waitForURL('**/home');
}
