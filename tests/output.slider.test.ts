// The report's stepping section in a real browser: the system's headless Chromium driven over its
// DevTools protocol (playwright-core, which uses the installed browser and downloads none).
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RunFiles } from '../src/output/runfiles.js';
import { externalReferences } from '../src/output/report.js';
import { fixtureCase, fixtureRun } from './output.fixture.js';

const CHROMIUM = '/usr/bin/chromium';
const have = existsSync(CHROMIUM);
if (!have) console.warn(`skipping the browser test of the report's slider: ${CHROMIUM} is absent (Debian package "chromium")`);

const dir = mkdtempSync(join(tmpdir(), 'rupta-slider-'));
const profile = mkdtempSync(join(tmpdir(), 'rupta-chromium-'));
afterAll(() => { rmSync(dir, { recursive: true, force: true }); rmSync(profile, { recursive: true, force: true }); });

const STEPS = 12;
beforeAll(async () => {
  const c = fixtureCase({ frames: ['png'], maxFrames: 5, animation: 'none', pngWidth: 300 });
  const r = fixtureRun(STEPS);
  const files = new RunFiles(dir, c, { force: true });
  for (const e of r.events) files.step(e);
  await files.finish(r.result, { meshSeconds: 0, totalSeconds: 1, initialMesh: r.mesh, final: r.events[STEPS].snapshot() });
}, 60000);

describe('report.html stepping through the frames', () => {
  it('embeds every frame and needs nothing from outside', () => {
    const page = readFileSync(join(dir, 'report.html'), 'utf8');
    const data = JSON.parse(/<script type="application\/json" id="stepper-data">(.*?)<\/script>/s.exec(page)![1]) as { step: number; src: string }[];
    expect(data.map((f) => f.step)).toEqual([0, 4, 8, 12]);
    for (const f of data) expect(f.src).toMatch(/^data:image\/png;base64,/);
    expect(externalReferences(page)).toEqual([]);
    expect(page).not.toContain('http');
  });

  it.skipIf(!have)(`steps with the arrow keys and the slider while the marker moves along the curve${have ? '' : ` (skipped: ${CHROMIUM} is absent)`}`, async () => {
    const { chromium } = await import('playwright-core');
    const browser = await chromium.launchPersistentContext(profile, {
      executablePath: CHROMIUM, headless: true,
      args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    try {
      const page = await browser.newPage();
      const problems: string[] = [], requests: string[] = [];
      page.on('console', (m) => problems.push(`${m.type()}: ${m.text()}`));
      page.on('pageerror', (e) => problems.push(`error: ${e.message}`));
      page.on('request', (q) => { if (!/^(file|data):/.test(q.url())) requests.push(q.url()); });
      await page.goto(`file://${join(dir, 'report.html')}`);
      const shown = async () => ({
        step: await page.locator('#stepper-step').textContent(),
        src: await page.locator('#stepper-frame').getAttribute('src'),
        cx: Number(await page.locator('#stepper-marker').getAttribute('cx')),
        cy: Number(await page.locator('#stepper-marker').getAttribute('cy')),
      });
      const last = await shown();
      expect(last.step).toBe('Step 12 (4 of 4)');
      await page.keyboard.press('ArrowLeft');
      const eight = await shown();
      expect(eight.step).toBe('Step 8 (3 of 4)');
      expect(eight.src).not.toBe(last.src);
      expect(eight.cx).toBeLessThan(last.cx); // less opening
      await page.keyboard.press('Home');
      const first = await shown();
      expect(first.step).toBe('Step 0 (1 of 4)');
      await page.keyboard.press('ArrowRight');
      const four = await shown();
      expect(four.step).toBe('Step 4 (2 of 4)');
      // the fixture's load falls after its peak at step 3: the marker stands higher at step 4 than at step 12 (y grows downward)
      expect(four.cy).toBeLessThan(last.cy);
      // the slider itself, with the keyboard
      await page.locator('#stepper-slider').focus();
      await page.keyboard.press('ArrowRight');
      expect((await shown()).step).toBe('Step 8 (3 of 4)');
      await page.keyboard.press('End');
      expect((await shown()).step).toBe('Step 12 (4 of 4)');
      // the frame drawn is a real picture
      const natural = await page.locator('#stepper-frame').evaluate((img) => (img as unknown as { naturalWidth: number }).naturalWidth);
      expect(natural).toBeGreaterThan(100);
      expect(problems).toEqual([]);
      expect(requests).toEqual([]);
    } finally {
      await browser.close();
    }
  }, 60000);
});
