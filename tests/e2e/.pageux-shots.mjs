// scratch: viewport screenshots for looking (not committed)
import { finishedDigest, launchBrowser, newPage, serveSite } from './support.mjs';
const [width, preset, ...tops] = process.argv.slice(2);
const site = await serveSite();
const context = await launchBrowser({ width: Number(width), height: 900 });
const page = await newPage(context);
await page.goto(site.url);
await finishedDigest(page);
if (preset !== 'broad-leaf') { await page.selectOption('#start-from', preset); await finishedDigest(page); }
for (const top of tops) {
  await page.screenshot({ path: `/tmp/pageux/${width}-${preset}-${top}.png`, fullPage: true, clip: { x: 0, y: Number(top), width: Number(width), height: 900 } });
}
console.log(page.errors);
await context.close(); site.close();
