// A report page opened in headless Chromium (Debian's chromium, through playwright-core): its console errors,
// its images, and text that overflows its box or sticks out of the page's column (DOM bounding boxes).
import fs from "node:fs";
import type { Browser, Page } from "playwright-core";

/** The Chromium executable, when the machine has one. */
export const CHROMIUM = ["/usr/bin/chromium", "/usr/bin/chromium-browser"].find((p) => fs.existsSync(p));

/** Headless Chromium, with no network chatter of its own. */
export async function launchChromium(): Promise<Browser> {
  const { chromium } = await import("playwright-core");
  return chromium.launch({
    executablePath: CHROMIUM ?? "/usr/bin/chromium",
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
}

/** Open `file` in a 1100 × 900 page; `errors` collects its console errors and page errors. */
export async function openPage(browser: Browser, file: string): Promise<{ page: Page; errors: string[] }> {
  const page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
  const errors: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error") errors.push(m.text());
  });
  page.on("pageerror", (e) => errors.push(e.message));
  await page.goto(`file://${file}`);
  return { page, errors };
}

/** Each image: loaded, and its natural width. */
export async function pageImages(page: Page): Promise<{ ok: boolean; w: number }[]> {
  return (await page.evaluate(`Array.from(document.images).map((e) => ({ ok: e.complete && e.naturalWidth > 0, w: e.naturalWidth }))`)) as { ok: boolean; w: number }[];
}

/** Text that overflows its box, or boxes that stick out of the page's column. */
export async function overflowing(page: Page): Promise<string[]> {
  return (await page.evaluate(`(() => {
    const bad = [];
    const column = document.body.getBoundingClientRect();
    for (const e of document.querySelectorAll("h1,h2,h3,p,li,th,td,figcaption,figure,img,.table,table,pre")) {
      const box = e.getBoundingClientRect();
      if (e.scrollWidth > e.clientWidth + 1 && e.tagName !== "IMG") bad.push(e.tagName + " overflows: " + e.textContent.slice(0, 40));
      if (box.right > column.right + 1 || box.left < column.left - 1) bad.push(e.tagName + " sticks out: " + e.textContent.slice(0, 40));
    }
    return bad;
  })()`)) as string[];
}
