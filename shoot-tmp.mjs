// Screenshots of the running dev server: DEPOT=<name> node shoot.mjs <email> <path> <name> [phone]
import { chromium } from 'playwright-core';
const [email, path, name, phone] = process.argv.slice(2);
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium' });
const ctx = await browser.newContext({ viewport: phone ? { width: 390, height: 844 } : { width: 1366, height: 900 }, baseURL: 'http://127.0.0.1:3400' });
const page = await ctx.newPage();
const r = await page.request.post('/api/auth/login', { data: { email, password: 'nightyard-demo' } });
if (!r.ok()) throw new Error(await r.text());
await page.goto(path);
await page.waitForTimeout(2500);
if (process.env.DEPOT) {
  await page.getByRole('button', { name: /Depot/ }).first().click();
  await page.locator('.cdk-overlay-container').getByText(new RegExp(process.env.DEPOT)).click();
  await page.waitForTimeout(2500);
}
if (process.env.WAIT) await page.waitForTimeout(Number(process.env.WAIT));
if (process.env.SCROLL) {
  await page.getByText(process.env.SCROLL).first().scrollIntoViewIfNeeded();
  await page.waitForTimeout(500);
}
if (process.env.ELEMENT) await page.locator(process.env.ELEMENT).nth(Number(process.env.NTH ?? 0)).screenshot({ path: `/work/notes/shots-s35/${name}.png` });
else await page.screenshot({ path: `/work/notes/shots-s35/${name}.png`, fullPage: !process.env.SCROLL });
await browser.close();
