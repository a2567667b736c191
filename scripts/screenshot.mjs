// node scripts/screenshot.mjs report.html out.png : full-page screenshot in headless Chromium (for looking at reports).
import { chromium } from "playwright-core";
import { pathToFileURL } from "node:url";

const [, , html, png] = process.argv;
const browser = await chromium.launch({
  executablePath: process.env.CHROMIUM ?? "/usr/bin/chromium",
  args: [
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
  ],
});
const page = await browser.newPage({ viewport: { width: 900, height: 1200 } });
await page.goto(pathToFileURL(html).href);
const clip = process.argv[4] ? JSON.parse(process.argv[4]) : undefined;
await page.screenshot({ path: png, fullPage: true, clip });
await browser.close();
