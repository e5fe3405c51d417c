// Accessibility checks for browser tests: axe-core through @axe-core/playwright, plus a plain check
// that every form control has a name a screen reader can read out.
//
//   const audit = new AxeAudit();
//   await audit.check(page, 'job page (technician, phone)');   // once per distinct page and state
//   audit.serious()                                             // serious and critical findings so far
//   audit.report()                                              // the findings as readable lines
import { AxeBuilder } from '@axe-core/playwright';
import type { Page } from 'playwright-core';

export interface AxeFinding {
	/** The name the test gave the page. */
	page: string;
	url: string;
	rule: string;
	impact: string;
	help: string;
	helpUrl: string;
	/** CSS selectors of the offending elements, with a snippet of each. */
	nodes: { target: string; html: string; summary: string }[];
}

export interface UnlabelledControl {
	page: string;
	url: string;
	control: string;
}

const SERIOUS = new Set(['serious', 'critical']);

/** Every visible input, select and textarea whose accessible name is empty. */
async function unlabelledControls(page: Page): Promise<string[]> {
	return page.evaluate(() => {
		const controls = [...document.querySelectorAll<HTMLElement>('input, select, textarea')];
		const named = (el: HTMLElement) => {
			if (el.getAttribute('aria-label')?.trim()) return true;
			const by = el.getAttribute('aria-labelledby');
			if (by && by.split(/\s+/).some((id) => document.getElementById(id)?.textContent?.trim())) return true;
			const labels = (el as HTMLInputElement).labels;
			if (labels && [...labels].some((l) => l.textContent?.trim())) return true;
			return Boolean(el.getAttribute('title')?.trim());
		};
		return controls
			.filter((el) => {
				const type = el.getAttribute('type');
				if (type === 'hidden' || type === 'submit' || type === 'button') return false;
				const style = getComputedStyle(el);
				// Visually hidden file inputs behind a styled label still count: they have labels.
				if (style.display === 'none' || (style.visibility === 'hidden' && el.getAttribute('type') !== 'file')) return false;
				return !named(el);
			})
			.map((el) => el.outerHTML.slice(0, 160));
	});
}

export class AxeAudit {
	readonly findings: AxeFinding[] = [];
	readonly unlabelled: UnlabelledControl[] = [];
	readonly checked: string[] = [];

	/** Runs axe on the page as it stands and records what it finds under `name`. */
	async check(page: Page, name: string): Promise<void> {
		const result = await new AxeBuilder({ page }).analyze();
		this.checked.push(name);
		for (const v of result.violations) {
			this.findings.push({
				page: name,
				url: page.url(),
				rule: v.id,
				impact: v.impact ?? 'unknown',
				help: v.help,
				helpUrl: v.helpUrl,
				nodes: v.nodes.map((n) => ({ target: n.target.join(' '), html: n.html.slice(0, 160), summary: (n.failureSummary ?? '').replace(/\s+/g, ' ').trim() }))
			});
		}
		for (const control of await unlabelledControls(page)) this.unlabelled.push({ page: name, url: page.url(), control });
	}

	serious(): AxeFinding[] {
		return this.findings.filter((f) => SERIOUS.has(f.impact));
	}

	minor(): AxeFinding[] {
		return this.findings.filter((f) => !SERIOUS.has(f.impact));
	}

	/** The findings as lines a person can act on. */
	report(findings = this.findings): string {
		const lines: string[] = [];
		for (const f of findings) {
			lines.push(`[${f.impact}] ${f.rule} on "${f.page}" (${f.url}): ${f.help}`);
			for (const n of f.nodes.slice(0, 5)) lines.push(`    ${n.target}  ${n.html}${n.summary ? `\n      ${n.summary}` : ''}`);
			if (f.nodes.length > 5) lines.push(`    … and ${f.nodes.length - 5} more`);
		}
		for (const u of this.unlabelled) lines.push(`[unlabelled control] on "${u.page}" (${u.url}): ${u.control}`);
		return lines.join('\n');
	}
}
