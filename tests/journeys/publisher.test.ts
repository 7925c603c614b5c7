// Browser journey of a publisher: create a listing → upload an ontology and data → watch the progress → inspect the
// facts → publish → see the public listing page and the catalogue. Real chromium, real app, real worker and reasoner.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { createTestUser } from '../support/app.js';
import { journeyShots, launchBrowser, startApp, type BrowserSession, type RunningApp } from '../support/browser.js';
import { startJobs, type RunningJobs } from '../../server/jobs/index.js';
import { stopQueue } from '../../server/jobs/queue.js';

// This file's own queue: the worker started here processes exactly the journey's uploads.
process.env.THENCE_KB_QUEUE = `kb-journey-${randomUUID().slice(0, 8)}`;

const SEED = path.resolve('server/seed/data/glacier');
let app: RunningApp;
let jobs: RunningJobs | undefined;
let browser: BrowserSession | null = null;

beforeAll(async () => {
  // The worker is started inside the journey, once the version page shows the upload waiting: that way the page is
  // seen to follow the job by itself however fast the reasoner is.
  app = await startApp();
});
afterAll(async () => {
  await browser?.close();
  await jobs?.stop();
  if (app) await stopQueue(app.ctx, 5000);
  await app?.close();
});

async function ensureJobs(): Promise<void> {
  jobs ??= await startJobs(app.ctx);
}

const eventually = <T>(read: () => T | Promise<T>, timeout = 15_000) => expect.poll(read, { timeout });

async function signIn(page: Page, email: string, password: string): Promise<void> {
  await page.goto(app.url + '/sign-in');
  await page.locator('input[name="email"]').fill(email);
  await page.locator('input[name="password"]').fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname !== '/sign-in');
}

describe('journey: publisher from upload to published listing', () => {
  it('creates a listing, uploads, watches it process, checks facts and publishes', async () => {
    const user = await createTestUser(app.ctx, { roles: ['publisher'] });
    browser = await launchBrowser();
    const page = browser.page;
    const shot = journeyShots(page, 'publisher-upload-to-published');
    await signIn(page, user.email, user.password);

    await page.goto(app.url + '/publisher');
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('My listings');
    await shot('my-listings-empty');
    await page.locator('[data-test="new-listing"]').click();
    await page.waitForURL((url) => url.pathname === '/publisher/listings/new');

    const slug = `valley-${Date.now().toString(36)}`;
    // A bad submit first: the form says what is wrong beside each field.
    await page.locator('[data-test="save-listing"]').click();
    await eventually(() => page.locator('.el-form-item__error').count()).toBeGreaterThan(2);
    await shot('listing-form-errors');
    await page.locator('input[name="title"]').fill('Valley trails journey');
    await page.locator('input[name="slug"]').fill(slug);
    await page.locator('input[name="summary"]').fill('Trails and huts, reasoned by cases, for the journey test.');
    await page.locator('textarea[name="descriptionMd"]').fill('Trails of an **invented** valley.\n\n<script>window.bad = 1</script>');
    await page.locator('input[name="licence"]').fill('CC0 1.0');
    await page.locator('input[name="contact"]').fill('trails@example.test');
    await page.locator('[data-test="save-listing"]').click();
    await page.waitForURL((url) => /^\/publisher\/listings\/[0-9a-f-]{36}$/.test(url.pathname));
    await eventually(() => page.locator('[data-test="upload-form"]').isVisible()).toBe(true);

    // Upload without the notice: refused in the form.
    await page.locator('[data-test="ontology-input"] input[type="file"]').setInputFiles(path.join(SEED, 'glacier.ofn'));
    await page.locator('[data-test="dataset-input"] input[type="file"]').setInputFiles(path.join(SEED, 'network.ttl'));
    await page.locator('[data-test="upload-submit"]').click();
    await eventually(() => page.locator('.el-form-item__error').allTextContents()).toContain('Tick the box to confirm.');
    await shot('upload-needs-notice');
    await page.locator('[data-test="notice"]').click();
    // Record every state the status tag shows from the moment it appears, to see the page change by itself
    // (polling), without a reload. The observer lives in the window, which the single-page navigation keeps.
    await page.evaluate(() => {
      const seen: string[] = [];
      (window as unknown as { seenStatuses: string[] }).seenStatuses = seen;
      const read = () => {
        const text = document.querySelector('[data-test="version-status"]')?.textContent?.trim() ?? '';
        if (text && seen.at(-1) !== text) seen.push(text);
      };
      new MutationObserver(read).observe(document.body, { subtree: true, childList: true, characterData: true });
    });
    await page.locator('[data-test="upload-submit"]').click();

    // The version page shows the upload waiting for a worker; once one starts, the page follows the job until ready.
    await page.waitForURL((url) => /^\/publisher\/versions\/[0-9a-f-]{36}$/.test(url.pathname), { timeout: 30_000 });
    await eventually(() => page.locator('[data-test="version-status"]').textContent()).toBe('Waiting');
    await shot('version-waiting');
    await ensureJobs();
    await eventually(() => page.locator('[data-test="version-status"]').textContent(), 60_000).toBe('Ready');
    const seen = await page.evaluate(() => (window as unknown as { seenStatuses: string[] }).seenStatuses);
    expect(seen[0], `statuses seen: ${seen.join(' → ')}`).toBe('Waiting');
    expect(seen.at(-1)).toBe('Ready');
    await eventually(() => page.locator('[data-test="consistency"]').textContent()).toContain('Consistent');
    await shot('version-ready');
    await page.getByRole('tab', { name: 'Profile' }).click();
    await eventually(() => page.locator('[data-test="profile-report"]').textContent()).toContain('reasoning by cases');
    await shot('version-profile');
    await page.getByRole('tab', { name: 'Rules' }).click();
    await eventually(() => page.locator('[data-test="rule-lines"]').textContent()).toContain('→');
    await page.locator('input[data-test="rule-search"], [data-test="rule-search"] input').fill('Waymarking');
    await eventually(async () => (await page.locator('[data-test="rule-lines"]').textContent())!.split('\n').every((l) => l.includes('Waymarking'))).toBe(true);
    await shot('version-rules');
    await page.getByRole('tab', { name: 'Fact counts' }).click();
    await eventually(() => page.locator('.version-page__tabs canvas').count()).toBeGreaterThan(0);
    await shot('version-fact-counts');
    await page.getByRole('tab', { name: 'Job log' }).click();
    await eventually(() => page.locator('[data-test="job-log"]').textContent()).toContain('Ready:');

    // Facts browser: filter by subject; the by-cases fact shows as entailed.
    await page.locator('[data-test="browse-facts"]').click();
    await page.waitForURL((url) => url.pathname.endsWith('/facts'));
    await eventually(() => page.locator('[data-test="facts-table"] .el-table__row').count()).toBeGreaterThan(5);
    await page.locator('input[data-test="filter-subject"], [data-test="filter-subject"] input').fill('https://demo.thence.test/glacier#ridge-walk');
    await page.locator('[data-test="filter-apply"]').click();
    await eventually(() => page.locator('[data-test="facts-table"]').textContent()).toContain('NeedsWaymarking');
    const row = page.locator('[data-test="facts-table"] .el-table__row', { hasText: 'NeedsWaymarking' });
    // Tags animate in and out; wait for the old page's tags to leave.
    await eventually(() => row.locator('[data-test="tag-entailed"]').count()).toBe(1);
    await expect(page.locator('[data-test="facts-table"] [data-test="tag-asserted"]').count()).resolves.toBeGreaterThan(0);
    await shot('facts-browser');

    // Publish and see the public page.
    await page.goBack();
    await page.locator('[data-test="publish"]').click();
    await eventually(() => page.getByText('served', { exact: true }).count()).toBeGreaterThan(0);
    await shot('version-published');
    await page.goto(app.url + `/listings/${slug}`);
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Valley trails journey');
    const description = page.locator('[data-test="description"]');
    await expect(description.locator('strong').textContent()).resolves.toBe('invented');
    await expect(description.locator('script').count()).resolves.toBe(0);
    await expect(page.evaluate(() => (window as unknown as { bad?: number }).bad)).resolves.toBeUndefined();
    await eventually(() => page.locator('[data-test="vocabulary"]').textContent()).toContain('NeedsWaymarking');
    await expect(page.getByText(`/api/v1/kbs/${slug}/facts`).count()).resolves.toBeGreaterThan(0);
    await shot('public-listing');
    await page.goto(app.url + '/catalogue');
    await eventually(() => page.locator('[data-test="catalogue"]').textContent()).toContain('Valley trails journey');
    await shot('catalogue');
  }, 180_000);

  it('shows why a version failed and offers approximate mode for axioms outside ALCHIQ', async () => {
    await ensureJobs();
    const user = await createTestUser(app.ctx, { roles: ['publisher'] });
    await browser?.close();
    browser = await launchBrowser();
    const page = browser.page;
    const shot = journeyShots(page, 'publisher-outside-profile');
    await signIn(page, user.email, user.password);
    await page.goto(app.url + '/publisher/listings/new');
    await page.locator('input[name="title"]').fill('River network journey');
    await page.locator('input[name="slug"]').fill(`rivers-${Date.now().toString(36)}`);
    await page.locator('input[name="summary"]').fill('Rivers and weirs, with a transitive property.');
    await page.locator('input[name="licence"]').fill('CC0 1.0');
    await page.locator('input[name="contact"]').fill('rivers@example.test');
    await page.locator('[data-test="save-listing"]').click();
    await page.waitForURL((url) => /^\/publisher\/listings\/[0-9a-f-]{36}$/.test(url.pathname));
    // Transitivity is outside ALCHIQ (Baader et al. 2003, ch. 2 — from memory): strict mode refuses the ontology.
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'thence-journey-'));
    const onto = path.join(dir, 'rivers.ofn');
    fs.writeFileSync(onto, 'Prefix(:=<http://example.org/rivers#>)\nOntology(\n  TransitiveObjectProperty(:upstreamOf)\n  SubClassOf(:Weir :Structure)\n)\n');
    const data = path.join(dir, 'weirs.nt');
    fs.writeFileSync(data, '<http://example.org/rivers#w1> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://example.org/rivers#Weir> .\n');
    await page.locator('[data-test="ontology-input"] input[type="file"]').setInputFiles(onto);
    await page.locator('[data-test="dataset-input"] input[type="file"]').setInputFiles(data);
    await page.locator('[data-test="notice"]').click();
    await page.locator('[data-test="upload-submit"]').click();
    await page.waitForURL((url) => /^\/publisher\/versions\/[0-9a-f-]{36}$/.test(url.pathname), { timeout: 30_000 });
    await eventually(() => page.locator('[data-test="version-status"]').textContent(), 60_000).toBe('Failed');
    await eventually(() => page.locator('[data-test="version-error"]').textContent()).toContain('outside ALCHIQ');
    await page.getByRole('tab', { name: 'Profile' }).click();
    await eventually(() => page.locator('[data-test="profile-report"]').textContent()).toContain('TransitiveObjectProperty');
    await shot('failed-outside-profile');
    const first = page.url();
    await page.locator('[data-test="rerun-approximate"]').click();
    await page.waitForURL((url) => url.href !== first && /^\/publisher\/versions\/[0-9a-f-]{36}$/.test(url.pathname));
    await eventually(() => page.locator('[data-test="version-status"]').textContent(), 60_000).toBe('Ready');
    await expect(page.getByText('approximate', { exact: true }).count()).resolves.toBeGreaterThan(0);
    await page.getByRole('tab', { name: 'Profile' }).click();
    await eventually(() => page.locator('[data-test="profile-report"]').textContent()).toContain('Set aside');
    await shot('approximate-ready');
    fs.rmSync(dir, { recursive: true, force: true });
  }, 180_000);
});
