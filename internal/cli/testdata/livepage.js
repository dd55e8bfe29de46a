// Drives the page `rfledger watch --serve` serves in a real headless Chromium (through
// playwright-core) and writes what it saw as JSON for TestLivePageInChromium to judge. It
// edits the sheet on disk itself, so the timings cover save -> watch -> page.
//
// Environment: RFL_PLAYWRIGHT (the playwright-core folder), RFL_CHROMIUM (the browser),
// RFL_URL (the served page), RFL_SHEET (the worksheet to edit), RFL_OUT (the JSON written),
// RFL_SHOTS (a folder for the screenshots), RFL_PROFILE (a fresh user data folder).
"use strict";
const fs = require("fs");
const path = require("path");
const { chromium } = require(process.env.RFL_PLAYWRIGHT);

const env = (k) => {
  const v = process.env[k];
  if (!v) throw new Error(k + " is not set");
  return v;
};
const url = env("RFL_URL"), sheet = env("RFL_SHEET"), outFile = env("RFL_OUT"), shots = env("RFL_SHOTS");
const res = { shots: [], steps: [] };
const started = Date.now();
const step = (s) => res.steps.push(s + " at " + (Date.now() - started) + " ms");

// The page's own text of an element, with no-break spaces as plain ones.
const text = (page, sel) => page.$eval(sel, (e) => e.textContent.replace(/\u00a0/g, " ").trim()).catch(() => null);

async function main() {
  const ctx = await chromium.launchPersistentContext(env("RFL_PROFILE"), {
    executablePath: env("RFL_CHROMIUM"),
    headless: true,
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
      "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    viewport: { width: 1280, height: 900 },
    colorScheme: "light",
  });
  try {
    const page = ctx.pages()[0] || (await ctx.newPage());
    res.console = [];
    page.on("console", (m) => { if (m.type() === "error") res.console.push(m.text()); });
    page.on("pageerror", (e) => res.console.push(String(e)));
    let loads = 0;
    page.on("load", () => { loads++; });

    step("load");
    await page.goto(url, { waitUntil: "load" });
    await page.waitForSelector("#focus-value", { timeout: 5000 });
    // The first render's Monte Carlo may still be running: wait for the page to be complete.
    await page.waitForFunction(() => !document.getElementById("mc") && document.getElementById("report").textContent.includes("Monte Carlo median"), null, { timeout: 20000 });
    res.initialFocus = await text(page, "#focus-value");
    res.initialVerdict = await text(page, "#verdict");
    res.liveText = await text(page, "#live");
    res.foldedSweep = await page.evaluate(() => {
      const d = document.querySelector("details.fold");
      return d ? { open: d.open, rows: d.querySelectorAll("tbody tr").length, summary: d.querySelector("summary").textContent } : null;
    });

    // Unfold the sweep table (as a reader would), scroll well down, mark the document, and
    // watch which steps the report goes through.
    await page.evaluate(() => {
      const d = document.querySelector("details.fold");
      if (d) d.open = true;
      window.scrollTo(0, 2500);
      window.__sameDocument = true;
      window.__seen = { quick: false, running: false };
      const note = () => {
        const r = document.getElementById("report");
        if (r.textContent.includes("Monte Carlo: being computed")) window.__seen.quick = true;
        if (document.getElementById("mc")) window.__seen.running = true;
      };
      new MutationObserver(note).observe(document.body, { childList: true, subtree: true, characterData: true });
    });
    res.scrollBefore = await page.evaluate(() => window.scrollY);

    step("edit");
    const original = fs.readFileSync(sheet, "utf8");
    const edited = original.replace('is = "14 dBm"', 'is = "15 dBm"');
    if (edited === original) throw new Error("the sheet has no 14 dBm power to edit");
    const t0 = Date.now();
    fs.writeFileSync(sheet, edited);
    await page.waitForFunction(() => {
      const e = document.getElementById("focus-value");
      return e && e.textContent.replace(/\u00a0/g, " ") === "13.50 dB";
    }, null, { timeout: 5000, polling: 10 }).catch(() => {});
    res.updateMs = Date.now() - t0;
    res.updatedFocus = await text(page, "#focus-value");
    res.reportHasUpdated = await page.evaluate(() => document.getElementById("report").textContent.replace(/\u00a0/g, " ").includes("Focus: link.margin = 13.50 dB"));
    await page.waitForFunction(() => !document.getElementById("mc") && document.getElementById("report").textContent.includes("Monte Carlo median"), null, { timeout: 20000 }).catch(() => {});
    res.seen = await page.evaluate(() => window.__seen);
    res.monteCarloFilled = await page.evaluate(() => !document.getElementById("mc") && document.getElementById("report").textContent.includes("Monte Carlo median"));
    res.scrollAfter = await page.evaluate(() => window.scrollY);
    res.sameDocumentAfterEdit = await page.evaluate(() => window.__sameDocument === true);
    res.sweepStillOpen = await page.evaluate(() => { const d = document.querySelector("details.fold"); return !!d && d.open; });
    await shot(page, "1280-light-scrolled");

    step("broken save");
    const broken = edited.replace('eirp    = "= power - match - cable + antenna"', 'eirp    = "= power - match - cable + antena"');
    if (broken === edited) throw new Error("the sheet has no eirp formula to break");
    fs.writeFileSync(sheet, broken);
    await page.waitForSelector("#error", { timeout: 5000 }).catch(() => {});
    res.broken = await page.evaluate(() => {
      const bar = document.getElementById("bar"), err = document.getElementById("error");
      if (!err) return null;
      const r = err.getBoundingClientRect(), b = bar.getBoundingClientRect();
      return {
        barClass: bar.className,
        barTop: b.top,
        errorTop: r.top, errorBottom: r.bottom, viewport: window.innerHeight,
        scrollY: window.scrollY,
        text: err.textContent,
        focus: (document.getElementById("focus-value") || {}).textContent,
        report: document.getElementById("report").textContent.replace(/\u00a0/g, " ").includes("Focus: link.margin = 13.50 dB"),
        sameDocument: window.__sameDocument === true,
      };
    });
    if (res.broken && res.broken.focus) res.broken.focus = res.broken.focus.replace(/\u00a0/g, " ");
    await shot(page, "1280-light-broken");

    step("fix");
    fs.writeFileSync(sheet, edited);
    await page.waitForFunction(() => !document.getElementById("error") && document.getElementById("bar").className === "bar", null, { timeout: 5000 }).catch(() => {});
    res.fixed = await page.evaluate(() => !document.getElementById("error"));

    step("narrow and dark");
    res.layouts = {};
    res.chartContrast = {};
    for (const scheme of ["light", "dark"]) {
      await page.emulateMedia({ colorScheme: scheme });
      for (const width of [1280, 420]) {
        await page.setViewportSize({ width, height: 860 });
        await page.evaluate(() => window.scrollTo(0, 0));
        const name = width + "-" + scheme;
        res.layouts[name] = await page.evaluate(() => {
          // How many lines an element's text takes (a cell is as tall as its row, so its
          // own height would not tell).
          const lines = (e) => {
            const r = document.createRange();
            r.selectNodeContents(e);
            return Math.round(r.getBoundingClientRect().height / parseFloat(getComputedStyle(e).lineHeight));
          };
          const de = document.documentElement, cs = getComputedStyle(document.body);
          const img = document.querySelector("#report img");
          const boxes = Array.from(document.querySelectorAll(".tbl"));
          return {
            scrollWidth: de.scrollWidth, clientWidth: de.clientWidth,
            bodyBackground: cs.backgroundColor, bodyColor: cs.color,
            chartBackground: img ? getComputedStyle(img).backgroundColor : null,
            scrollingBoxes: boxes.filter((b) => b.scrollWidth > b.clientWidth + 1).length,
            boxes: boxes.length,
            focusLines: (() => { const f = document.getElementById("focus-value"); return f ? lines(f) : 0; })(),
            wrappedValues: Array.from(document.querySelectorAll("#report td")).filter((td) => /^[-+±]?[\d.]+(e[-+]?\d+)?\u00a0\S+$/.test(td.textContent.trim()) && lines(td) > 1).length,
          };
        });
        await shot(page, name);
        await page.evaluate(() => { const img = document.querySelector("#report img"); if (img) img.scrollIntoView(); });
        await shot(page, name + "-chart");
        if (width === 1280) { // the same charts as at 420 px, drawn larger
          res.chartContrast[scheme] = await chartContrast(page, "#report img");
          if (scheme === "dark") res.chartContrast.control = await controlContrast(page);
        }
      }
    }
    step("done");
    res.loads = loads;
    res.sameDocumentAtEnd = await page.evaluate(() => window.__sameDocument === true);
  } finally {
    await ctx.close();
  }
}

// chartContrast photographs the first chart as shown and returns the share of its pixels
// that stand out from the page's background with a contrast ratio of at least 4.5
// (WCAG 2.1's minimum for text; its definitions of relative luminance and contrast ratio).
async function chartContrast(page, sel) {
  const img = await page.$(sel);
  if (!img) return null;
  const png = (await img.screenshot()).toString("base64");
  return page.evaluate(async (png) => {
    const lum = (r, g, b) => {
      const f = (v) => { v /= 255; return v <= 0.04045 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4); };
      return 0.2126 * f(r) + 0.7152 * f(g) + 0.0722 * f(b);
    };
    const bg = getComputedStyle(document.body).backgroundColor.match(/\d+/g).map(Number);
    const lb = lum(bg[0], bg[1], bg[2]);
    const im = new Image();
    im.src = "data:image/png;base64," + png;
    await im.decode();
    const c = document.createElement("canvas");
    c.width = im.width; c.height = im.height;
    const g = c.getContext("2d");
    g.drawImage(im, 0, 0);
    const d = g.getImageData(0, 0, c.width, c.height).data;
    let n = 0;
    for (let i = 0; i < d.length; i += 4) {
      const l = lum(d[i], d[i + 1], d[i + 2]);
      if ((Math.max(l, lb) + 0.05) / (Math.min(l, lb) + 0.05) >= 4.5) n++;
    }
    return n / (d.length / 4);
  }, png);
}

// controlContrast measures, on the dark page, the first chart with its dark-mode rule taken
// out (served as a data: URL beside it): its text stays dark, and the measure must say so.
async function controlContrast(page) {
  const ok = await page.evaluate(async () => {
    const img = document.querySelector("#report img");
    const svg = await (await fetch(img.getAttribute("src"))).text();
    const stripped = svg.replace(/@media \(prefers-color-scheme:dark\)\{[^}]*\}\}/, "");
    if (stripped === svg) return false;
    const c = new Image();
    c.id = "control";
    c.width = img.width; c.height = img.height;
    c.src = "data:image/svg+xml;base64," + btoa(unescape(encodeURIComponent(stripped)));
    img.after(c);
    await c.decode();
    return true;
  });
  if (!ok) return null;
  const v = await chartContrast(page, "#control");
  await page.evaluate(() => document.getElementById("control").remove());
  return v;
}

async function shot(page, name) {
  const file = path.join(shots, "live-" + name + ".png");
  await page.screenshot({ path: file });
  res.shots.push(file);
}

main()
  .catch((e) => { res.error = String(e && e.stack || e); })
  .finally(() => { fs.writeFileSync(outFile, JSON.stringify(res, null, 1)); });
