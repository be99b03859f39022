import { existsSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { runCli, scratchDir } from '../cli/run-cli.js';

/**
 * The demo's HTML report opened in headless Chromium (Debian's package, which .ci/run installs):
 * it loads with no console error and no network request, its charts are drawn, and a screenshot
 * is kept in test-artifacts/ (gitignored) for a person to look at.
 */
const CHROMIUM = '/usr/bin/chromium';
const ARTIFACTS = join(import.meta.dirname, '..', '..', 'test-artifacts');
const present = existsSync(CHROMIUM);

if (!present) console.warn(`browser test skipped: ${CHROMIUM} is missing here (install it with: apt-get install -y chromium; CI installs it).`);

describe.skipIf(!present)('the HTML report in a browser', () => {
  it('opens offline with no console error and no network request, and draws its charts', async () => {
    const dir = scratchDir();
    expect((await runCli('demo', '--dir', dir, '--format', 'json', '--quiet')).status).toBe(0);
    const report = join(dir, 'report', 'report.html');
    const browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking'] });
    try {
      const page = await browser.newPage({ viewport: { width: 390, height: 844 } }); // a phone's width
      const problems: string[] = [];
      const requests: string[] = [];
      page.on('console', (message) => {
        if (message.type() === 'error') problems.push(message.text());
      });
      page.on('pageerror', (error) => problems.push(error.message));
      const url = pathToFileURL(report).href;
      // The only request allowed is the report itself: nothing is fetched, from the network or the disk.
      page.on('request', (request) => {
        if (request.url() !== url) requests.push(request.url());
      });
      await page.goto(url, { waitUntil: 'load' });
      expect(problems).toEqual([]);
      expect(requests).toEqual([]);
      const navCharts = await page.locator('#charts svg.chart').count();
      expect(navCharts).toBeGreaterThan(0);
      expect(await page.locator('#charts svg.chart polyline.nav').count()).toBe(navCharts);
      expect(await page.locator('#charts svg.chart .mark').count()).toBeGreaterThan(0);
      expect(await page.locator('#history svg.chart rect.bar').count()).toBeGreaterThan(0);
      const box = await page.locator('#charts svg.chart').first().boundingBox();
      expect(box!.width).toBeGreaterThan(200); // drawn, and within the phone's width
      expect(box!.width).toBeLessThanOrEqual(390);
      expect(await page.locator('.caution').innerText()).toContain("compliance function");
      mkdirSync(ARTIFACTS, { recursive: true });
      await page.screenshot({ path: join(ARTIFACTS, 'report-phone.png'), fullPage: true });
      await page.setViewportSize({ width: 1280, height: 900 });
      await page.screenshot({ path: join(ARTIFACTS, 'report-desktop.png'), fullPage: true });
      await page.emulateMedia({ media: 'print' });
      await page.screenshot({ path: join(ARTIFACTS, 'report-print.png'), fullPage: true });
    } finally {
      await browser.close();
    }
  });
});
