// A person's look at a page while building it: `npx tsx tests/helpers/look.ts <url path> [role] [out.png] [theme]`
// signs in as the demo user of that role on the dev server (BASE, default http://127.0.0.1:5173),
// waits for the charts, and saves a full-page screenshot; console errors are printed.
// VIEWPORT=1024x768 sets the window (default 1400x900; WIDTH alone still sets the width),
// CLICK=<selector> clicks the first match before the screenshot (a detail row, a Table switch),
// ELEMENT=<selector> saves only that element, its top 800 px (to look closely at a table).
import { launch, signInWithPassword } from './browser';

const [path = '/', role = 'engineer', out = '/tmp/look.png', theme = 'light'] = process.argv.slice(2);
const base = process.env.BASE ?? 'http://127.0.0.1:5173';
const browser = await launch();
const [width, height] = (process.env.VIEWPORT ?? `${process.env.WIDTH ?? 1400}x900`).split('x').map(Number);
const page = await browser.newPage({ viewport: { width, height }, colorScheme: theme === 'dark' ? 'dark' : 'light' });
page.setDefaultTimeout(120000);
page.on('console', (m) => m.type() === 'error' && console.log('[console]', m.text()));
page.on('pageerror', (e) => console.log('[pageerror]', e.message));
await signInWithPassword(page, base, `${role}@brackenford.example`, `brackenford-${role}-demo`);
const t0 = Date.now();
await page.goto(`${base}${path}`, { timeout: 120000 });
await page.waitForFunction(() => document.querySelectorAll('[data-state="loading"]').length === 0, null, { timeout: 30000 }).catch(() => console.log('still loading'));
console.log(`charts settled in ${Date.now() - t0} ms`);
await page.waitForLoadState("networkidle").catch(() => {});
await page.waitForFunction(() => document.querySelectorAll('[data-state="loading"]').length === 0, null, { timeout: 30000 }).catch(() => console.log("still loading"));
if (process.env.CLICK) await page.locator(process.env.CLICK).first().click();
await page.waitForTimeout(300);
const box = process.env.ELEMENT ? await page.locator(process.env.ELEMENT).first().boundingBox() : null;
const scroll = await page.evaluate(() => ({ x: window.scrollX, y: window.scrollY }));
if (box) await page.screenshot({ path: out, fullPage: true, clip: { x: box.x + scroll.x, y: box.y + scroll.y, width: box.width, height: Math.min(box.height, 800) } });
else await page.screenshot({ path: out, fullPage: true });
await browser.close();
