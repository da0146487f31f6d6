import { chromium } from 'playwright-core';
const b = await chromium.launch({ executablePath: '/usr/bin/chromium', args: ['--no-sandbox','--disable-gpu','--disable-quic','--no-first-run','--disable-background-networking','--disable-component-update','--disable-sync'] });
const p = await b.newPage({ viewport: { width: 1100, height: 1400 } });
const url = process.argv[2], name = process.argv[3], n = Number(process.argv[4] || 3);
await p.goto(url);
for (let k = 0; k < n; k++) await p.screenshot({ path: `/tmp/scratch/${name}-${k}.png`, clip: { x: 0, y: k * 1400, width: 1100, height: 1400 } , fullPage: true});
await b.close();
