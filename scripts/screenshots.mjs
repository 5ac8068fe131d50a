// Screenshots of pages for a look at what we build: BASE=http://localhost:3000 PAGES=/,/login [LOGIN=email] [FULL=1] [VIEWPORT=390x844] node scripts/screenshots.mjs
// Writes /tmp/shot<page>.png and lists any request that left the machine.
import { chromium } from '@playwright/test'
const base = process.env.BASE || 'http://localhost:3111'
const browser = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update'] })
const pages = (process.env.PAGES || '/,/login,/eclipses,/eclipses/2027-08-02').split(',')
// VIEWPORT=390x844 for a phone.
const [vw, vh] = (process.env.VIEWPORT || '1280x900').split('x').map(Number)
const ctx = await browser.newContext({ viewport: { width: vw, height: vh } })
const page = await ctx.newPage()
const outside = []
page.on('request', (r) => { const u = new URL(r.url()); if (!['localhost', '127.0.0.1'].includes(u.hostname) && u.protocol !== 'data:' && u.protocol !== 'blob:') outside.push(r.url()) })
if (process.env.LOGIN) {
  await page.goto(base + '/login'); await page.getByLabel('E-mail').fill(process.env.LOGIN); await page.getByLabel('Password').fill('eclipse-demo')
  await page.getByRole('button', { name: 'Sign in' }).click(); await page.waitForURL((u) => !u.pathname.startsWith('/login'))
}
for (const p of pages) {
  await page.goto(base + p, { waitUntil: 'networkidle' })
  await page.waitForTimeout(Number(process.env.WAIT || 300))
  const name = (process.env.PREFIX || '') + (p.replace(/[^a-z0-9]+/gi, '_') || 'home')
  await page.screenshot({ path: `/tmp/shot${name}.png`, fullPage: !!process.env.FULL })
  console.log('shot', name)
}
console.log('outside requests:', outside.length ? outside : 'none')
await browser.close()
