/**
 * Reports, labels and tag scanning in Debian's chromium. The PDF is rendered
 * to an image by poppler's pdftoppm and looked at; the scan flow runs with chromium's
 * fake camera playing a video of a tag's QR code that this test draws itself.
 */
import { execFile } from "node:child_process";
import { mkdir, readFile, writeFile } from "node:fs/promises";
import { join } from "node:path";
import { promisify } from "node:util";
import { chromium, expect, test, type Page } from "@playwright/test";
import QRCode from "qrcode";
import sharp from "sharp";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { DEMO_PASSWORD, signIn } from "./support/auth";

const run = promisify(execFile);
const OUT = join(process.cwd(), ".data", "test-results", "reports-e2e");
const TAG = "KL-0401"; // on position M-1 of the demo's main switchboard (server/seed/inventory.ts numbers tags from 401)

test.beforeAll(async () => {
  await mkdir(OUT, { recursive: true });
});

async function openReports(page: Page) {
  await page.goto(page.url().replace(/(\/sites\/[0-9a-f-]{36}).*$/, "$1/reports"));
  await expect(page.getByRole("heading", { name: "Reports and labels" })).toBeVisible();
}

test("a viewer makes the main board's survey, watches its pages arrive, and the first page looks like Tideline's cover", async ({
  page,
}) => {
  test.setTimeout(180_000);
  await signIn(page, "viewer");
  await openReports(page);
  await expectNoSeriousA11yViolations(page, "reports page");
  await expect(page.getByRole("heading", { name: "Tag labels" })).toHaveCount(0); // viewers do not print labels
  const board = page.getByRole("form", { name: "Condition survey (PDF)" }).getByLabel("Board", { exact: true });
  await board.selectOption((await board.locator("option", { hasText: "Main switchboard" }).getAttribute("value"))!);
  await page.getByRole("button", { name: "Make the report" }).click();
  await expect(page.getByText(/Page \d+ of \d+/)).toBeVisible({ timeout: 60_000 });
  const save = page.getByRole("link", { name: "Save the PDF" });
  await expect(save).toBeVisible({ timeout: 120_000 });
  const [download] = await Promise.all([page.waitForEvent("download"), save.click()]);
  expect(download.suggestedFilename()).toMatch(/^condition-survey-mv-kestrel-lantern-main-switchboard.*\.pdf$/);
  const pdf = join(OUT, "survey.pdf");
  await download.saveAs(pdf);

  // Page 1 as an image (pdftoppm, 50 dpi): A4 portrait, the dark hull band across the top, white paper below,
  // and the brass-toned caution box near the foot.
  await run("pdftoppm", ["-r", "50", "-f", "1", "-l", "1", "-png", "-singlefile", pdf, join(OUT, "cover")]);
  const img = sharp(join(OUT, "cover.png"));
  const meta = await img.metadata();
  expect(Math.abs(meta.width! - 413)).toBeLessThanOrEqual(1); // 210 mm at 50 dpi (poppler rounds up)
  expect(Math.abs(meta.height! - 585)).toBeLessThanOrEqual(1); // 297 mm
  const mean = async (top: number, height: number) => {
    const strip = await sharp(join(OUT, "cover.png"))
      .extract({ left: 0, top, width: meta.width!, height })
      .png()
      .toBuffer();
    const s = await sharp(strip).stats(); // stats() reads its input, so the strip is cut out first
    return s.channels.slice(0, 3).map((c) => c.mean);
  };
  const band = await mean(2, 25);
  expect(Math.max(...band)).toBeLessThan(60); // hull-900 #0d141b
  const paper = await mean(300, 20);
  expect(Math.min(...paper)).toBeGreaterThan(200);
  const words = (await run("pdftotext", ["-f", "1", "-l", "1", pdf, "-"])).stdout;
  expect(words).toContain("Condition survey");
  expect(words).toContain("Flooded switchgear can kill");
});

/** A short video (YUV 4:2:0, the .y4m chromium's fake camera plays) of a QR code on white. */
async function qrVideo(text: string, file: string) {
  const W = 640,
    H = 480;
  const code = await QRCode.toBuffer(text, { errorCorrectionLevel: "M", margin: 4, width: 360 });
  const grey = await sharp({ create: { width: W, height: H, channels: 3, background: "#ffffff" } })
    .composite([{ input: code, gravity: "center" }])
    .greyscale()
    .raw()
    .toBuffer();
  const y = Buffer.alloc(W * H);
  for (let i = 0; i < W * H; i++) y[i] = grey[i * (grey.length / (W * H))];
  const chroma = Buffer.alloc((W / 2) * (H / 2), 128); // grey: no colour
  const frame = Buffer.concat([Buffer.from("FRAME\n"), y, chroma, chroma]);
  await writeFile(
    file,
    Buffer.concat([Buffer.from(`YUV4MPEG2 W${W} H${H} F10:1 Ip A1:1 C420jpeg\n`), frame, frame, frame]),
  );
}

test("a volunteer's phone scans a tag with the camera and lands on its position", async ({ baseURL }) => {
  test.setTimeout(120_000);
  const video = join(OUT, "tag.y4m");
  await qrVideo(`${baseURL}/t/${TAG}`, video);
  expect((await readFile(video)).subarray(0, 9).toString()).toBe("YUV4MPEG2");
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-dev-shm-usage",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--disable-quic",
      "--use-fake-device-for-media-stream",
      "--use-fake-ui-for-media-stream",
      `--use-file-for-fake-video-capture=${video}`,
    ],
  });
  try {
    const context = await browser.newContext({
      baseURL,
      viewport: { width: 390, height: 844 },
      isMobile: true,
      hasTouch: true,
    });
    await context.grantPermissions(["camera"], { origin: baseURL });
    const page = await context.newPage();
    await signIn(page, "volunteer");
    await page.goto("/scan");
    await expect(page.getByRole("heading", { name: "Scan a tag" })).toBeVisible();
    await expectNoSeriousA11yViolations(page, "scan page");
    await page.getByRole("button", { name: "Scan a tag" }).click();
    await page.waitForURL(/\/sites\/[0-9a-f-]{36}\/boards\/[0-9a-f-]{36}\?position=[0-9a-f-]{36}/, { timeout: 30_000 });
    await expect(page.getByRole("dialog").getByText("M-1").first()).toBeVisible({ timeout: 30_000 });
    await page.screenshot({ path: join(OUT, "scanned-phone.png") });
  } finally {
    await browser.close();
  }
});

test("a signed-out person who opens a tag's link signs in and lands on the position", async ({ page }) => {
  await page.goto(`/t/${TAG}`);
  await page.waitForURL(/\/sign-in\?next=/);
  await page.getByLabel("E-mail").fill("viewer@tideline.test");
  await page.getByLabel("Password").fill(DEMO_PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/boards\/[0-9a-f-]{36}\?position=/);
  await expect(page.getByRole("dialog").getByText("M-1").first()).toBeVisible({ timeout: 30_000 });
});

test("typing a tag that is on no site of the person's says so without saying more", async ({ page }) => {
  await signIn(page, "viewer");
  await page.goto("/scan");
  await page.getByLabel("Or type the tag number").fill("ZZ-9999");
  await page.getByRole("button", { name: "Open" }).click();
  await expect(page.getByRole("alert")).toContainText("No position on the sites you can see carries tag ZZ-9999");
});

test("a volunteer prints thermal labels for one section and gets a PDF", async ({ page }) => {
  test.setTimeout(120_000); // the accessibility scan of the whole page is slow on a busy machine
  await signIn(page, "volunteer");
  await openReports(page);
  const labels = page.getByRole("form", { name: "Tag labels" });
  // other tests add boards to the demo site, so choose the demo's main board by name
  const board = labels.getByLabel("Board", { exact: true });
  await board.selectOption((await board.locator("option", { hasText: "Main switchboard" }).getAttribute("value"))!);
  await labels.getByLabel("Print labels for").selectOption("section");
  await labels.getByLabel("Label stock").selectOption("thermal-50x25");
  await labels.getByRole("button", { name: /Make \d+ labels?/ }).click();
  await expect(labels.getByRole("link", { name: "Save the PDF" })).toBeVisible({ timeout: 30_000 });
  await expectNoSeriousA11yViolations(page, "reports page with labels");
});

test("a curator tags a board's untagged positions while printing their labels, and the form counts them at once", async ({
  page,
}) => {
  test.setTimeout(120_000);
  await signIn(page, "curator");
  const siteId = page.url().split("/sites/")[1].split("/")[0];
  // A board of its own (other tests share the demo site): three fuses, none tagged yet.
  const name = `Label board ${Date.now().toString(36)}`;
  const csv = ["board,designation,kind,grid_row,grid_col", ...[1, 2, 3].map((c) => `${name},LB-${c},fuse,1,${c}`)];
  const made = await page.request.post(`/api/sites/${siteId}/inventory/import?mode=commit`, {
    headers: { "content-type": "text/csv", origin: new URL(page.url()).origin },
    data: csv.join("\r\n") + "\r\n",
  });
  expect(made.status(), await made.text()).toBe(201);
  await openReports(page);
  const labels = page.getByRole("form", { name: "Tag labels" });
  const board = labels.getByLabel("Board", { exact: true });
  await board.selectOption((await board.locator("option", { hasText: name }).getAttribute("value"))!);
  const which = labels.getByLabel("Print labels for");
  await expect(which.locator("option", { hasText: "tag them now (3)" })).toHaveCount(1);
  await which.selectOption("untagged");
  await labels.getByLabel("Label stock").selectOption("thermal-50x25");
  // The board (its tiles' tags) is read again after the tags are given; nothing of another board is.
  const reads: string[] = [];
  page.on("request", (r) => {
    if (r.method() === "GET" && /\/api\/sites\/[^/]+\/boards\/[^/?]+/.test(r.url())) reads.push(r.url());
  });
  await labels.getByRole("button", { name: /Make \d+ labels?/ }).click();
  await expect(labels.getByRole("link", { name: "Save the PDF" })).toBeVisible({ timeout: 30_000 });
  await expect(which.locator("option", { hasText: "Every tagged position of the board (3)" })).toHaveCount(1);
  await expect(which.locator("option", { hasText: "tag them now (0)" })).toHaveCount(1);
  const boardId = await board.inputValue();
  expect(reads.length).toBeGreaterThan(0);
  expect(reads.every((u) => u.includes(`/boards/${boardId}`))).toBe(true);
});
