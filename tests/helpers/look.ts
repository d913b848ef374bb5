// A person's look at a page while building it: `npx tsx tests/helpers/look.ts <url path> [role] [out.png] [theme]`
// signs in as the demo user of that role on the dev server (BASE, default http://127.0.0.1:5173),
// waits for the charts, and saves a full-page screenshot; console errors are printed.
import { launch, signInWithPassword } from './browser';

const [path = '/', role = 'engineer', out = '/tmp/look.png', theme = 'light'] = process.argv.slice(2);
const base = process.env.BASE ?? 'http://127.0.0.1:5173';
const browser = await launch();
const page = await browser.newPage({ viewport: { width: Number(process.env.WIDTH ?? 1400), height: 900 }, colorScheme: theme === 'dark' ? 'dark' : 'light' });
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
await page.waitForTimeout(300);
await page.screenshot({ path: out, fullPage: true });
await browser.close();
