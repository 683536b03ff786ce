/**
 * Prepared files in Debian's chromium: a viewer asks for the condition survey
 * in the background, sees it in their list with its state, gets the in-app notice when the
 * worker has made it, and downloads it from the notice (a real PDF, checked by its header and
 * read back with poppler's pdftotext). Demo: MV Kestrel Lantern (invented).
 */
import { execFile } from "node:child_process";
import { mkdir } from "node:fs/promises";
import { join } from "node:path";
import { promisify } from "node:util";
import { expect, test, type Page } from "@playwright/test";
import { expectNoSeriousA11yViolations } from "./support/a11y";
import { signIn } from "./support/auth";

const run = promisify(execFile);
const OUT = join(process.cwd(), ".data", "test-results", "prepared-files-e2e");

test.beforeAll(async () => {
  await mkdir(OUT, { recursive: true });
});

async function openReports(page: Page) {
  await page.goto(page.url().replace(/(\/sites\/[0-9a-f-]{36}).*$/, "$1/reports"));
  await expect(page.getByRole("heading", { name: "Reports and labels" })).toBeVisible();
}

/** Clears notices left by an earlier run on the shared demo database, so this test reads only its own. */
async function dismissAll(page: Page) {
  const notices = page.getByRole("region", { name: "Notices" });
  for (let i = 0; i < 20 && (await notices.count()) > 0; i++) {
    const before = await notices.getByRole("button", { name: /^Dismiss/ }).count();
    if (before === 0) break;
    await notices
      .getByRole("button", { name: /^Dismiss/ })
      .first()
      .click();
    await expect(notices.getByRole("button", { name: /^Dismiss/ })).toHaveCount(before - 1);
  }
}

test("a viewer asks for the survey in the background, gets the notice, and downloads the PDF from it", async ({
  page,
}) => {
  test.setTimeout(240_000);
  await page.setViewportSize({ width: 360, height: 740 });
  await signIn(page, "viewer");
  await openReports(page);
  await dismissAll(page);

  const form = page.getByRole("form", { name: "Condition survey (PDF)" });
  const board = form.getByLabel("Board", { exact: true });
  await board.selectOption((await board.locator("option", { hasText: "Emergency board" }).getAttribute("value"))!);
  await form.getByLabel("Include photos (as found and after work, downscaled)").uncheck();
  await form.getByRole("button", { name: "Prepare in the background" }).click();

  // The list shows it at once, waiting or being made; the page never waits on the render.
  const files = page.getByRole("list", { name: "Your prepared files" });
  const mine = files.getByTestId("prepared-file").first();
  await expect(mine).toContainText("Condition survey report (PDF)");
  await expect(mine).toContainText(/Waiting its turn|Being made|Ready to download/);
  await page.screenshot({ path: join(OUT, "phone-asked.png"), fullPage: false });

  // The notice arrives (the notices poll every 10 s) with its download link.
  const notice = page
    .getByRole("region", { name: "Notices" })
    .getByRole("listitem")
    .filter({ hasText: "condition survey report (pdf) for MV Kestrel Lantern is ready" });
  await expect(notice).toBeVisible({ timeout: 180_000 });
  await expect(mine).toContainText("Ready to download");
  await page.screenshot({ path: join(OUT, "phone-ready.png"), fullPage: false });
  await expectNoSeriousA11yViolations(page, "reports page with a prepared file and its notice");

  const [download] = await Promise.all([
    page.waitForEvent("download"),
    notice.getByRole("link", { name: "Download" }).click(),
  ]);
  expect(download.suggestedFilename()).toMatch(/^condition-survey-mv-kestrel-lantern-emergency-board.*\.pdf$/);
  const pdf = join(OUT, "prepared-survey.pdf");
  await download.saveAs(pdf);
  const text = (await run("pdftotext", ["-layout", pdf, "-"], { maxBuffer: 64 << 20 })).stdout;
  expect(text).toContain("Emergency board");
  expect(text).toMatch(/certifies\s+nothing/i);

  // Downloading from the notice dismisses it; the file stays in the list until its keeping time ends.
  await expect(notice).toHaveCount(0);
  await expect(mine).toContainText("Ready to download");
  await expect(page.getByText(/Each file is kept for \d+ hours/)).toBeVisible();
});
