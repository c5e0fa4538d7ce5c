import { readFile } from "node:fs/promises";
import Papa from "papaparse";
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import yauzl from "yauzl";
import { DEMO } from "../helpers/app.ts";
import { openAs, screenshot, useBrowserApp, watchErrors } from "../helpers/browser.ts";

const { app, browsers } = useBrowserApp();

/** Every entry of a zip read back with yauzl, by name. */
function unzip(buffer: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(buffer, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return reject(err ?? new Error("no zip"));
      const out = new Map<string, Buffer>();
      zip.on("end", () => resolve(out));
      zip.on("error", reject);
      zip.on("entry", (entry: yauzl.Entry) =>
        zip.openReadStream(entry, (e, stream) => {
          if (e || !stream) return reject(e ?? new Error("no stream"));
          const chunks: Buffer[] = [];
          stream.on("data", (c: Buffer) => chunks.push(c));
          stream.on("end", () => {
            out.set(entry.fileName, Buffer.concat(chunks));
            zip.readEntry();
          });
        }),
      );
      zip.readEntry();
    });
  });
}

describe("press kits in the browser", () => {
  it("marketing selects three cleared photos in the media library and downloads them as one zip with its two manifests", async () => {
    const t = app();
    const b = await browsers.launch();
    const page = await openAs(b.context, t.baseUrl, DEMO.marketing, /\/office$/);
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/office/media?sensitivity=cleared&status=ready`);
    await page.getByRole("heading", { name: "Media library", level: 1 }).waitFor();
    const cards = page.getByRole("list", { name: "Photos" }).getByRole("listitem");
    await cards.first().waitFor();
    for (let i = 0; i < 3; i += 1) await cards.nth(i).getByRole("checkbox").check();
    const bar = page.getByRole("region", { name: "Download the selected photos" });
    await bar.getByLabel("Press kit size").selectOption("640");
    const [download] = await Promise.all([page.waitForEvent("download"), bar.getByRole("button", { name: "Download as a press kit (3)" }).click()]);
    expect(download.suggestedFilename()).toMatch(/^aldermere-phase-2-press-kit-\d{4}-\d{2}-\d{2}\.zip$/);
    const files = await unzip(await readFile((await download.path())!));
    const rows = Papa.parse<Record<string, string>>(files.get("manifest.csv")!.toString("utf8"), { header: true, skipEmptyLines: true }).data;
    expect(rows).toHaveLength(3);
    expect([...files.keys()].sort()).toEqual([...rows.map((r) => r.file!), "manifest.csv", "manifest.txt"].sort());
    for (const r of rows) expect((await sharp(files.get(r.file!)!).metadata()).width).toBeLessThanOrEqual(640);
    await screenshot(page, "press-kit-library");
    expect(errors).toEqual([]);
  });

  it("a visitor finds 'Download these photographs' under the gallery's filter, with the usage terms line", async () => {
    const t = app();
    const b = await browsers.launch();
    const page = await b.context.newPage();
    const errors = watchErrors(page);
    await page.goto(`${t.baseUrl}/projects/aldermere-phase-2/gallery`);
    const link = page.getByTestId("press-kit-link");
    await link.getByRole("link", { name: "Download these photographs" }).waitFor();
    expect(await link.getByRole("link", { name: "Download these photographs" }).getAttribute("href")).toBe("/projects/aldermere-phase-2/press-kit.zip");
    await expect.poll(() => link.textContent()).toMatch(/Usage terms: |Ask .+ before publishing them\./);
    const [download] = await Promise.all([page.waitForEvent("download"), link.getByRole("link", { name: "Download these photographs" }).click()]);
    const files = await unzip(await readFile((await download.path())!));
    expect(files.has("manifest.csv") && files.has("manifest.txt")).toBe(true);
    expect(files.size).toBeGreaterThan(2);
    expect(errors).toEqual([]);
  });
});
