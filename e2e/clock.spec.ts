import { expect, test } from "@playwright/test";
import { icuMinute } from "../tests/helpers/icu";
import { signIn } from "./support/auth";

// A browser in New Zealand set to US English: the pages still write 24-hour times with the ISO day, on the
// browser's own clock (DEVELOPERS.md "Every page keeps one clock"); ICU's tz data is the reference.
const ZONE = "Pacific/Auckland";
test.use({ timezoneId: ZONE, locale: "en-US" });

test("a defect's history reads on the phone's own clock, 24-hour, whatever the browser's locale", async ({ page }) => {
  await signIn(page, "curator");
  const site = new URL(page.url()).pathname.split("/")[2];
  const list = await (await page.request.get(`/api/sites/${site}/defects?size=10`)).json();
  const id = list.rows[0].id as string;
  const detail = await (await page.request.get(`/api/sites/${site}/defects/${id}`)).json();
  const at = (detail.defect?.history ?? detail.history)[0].at as string;

  await page.goto(`/sites/${site}/defects/${id}`);
  const history = page.locator("section", { has: page.getByRole("heading", { name: "History" }) });
  await expect(history.getByText(icuMinute(at, ZONE), { exact: true }).first()).toBeVisible();
  // The server's UTC minute is not what the page shows (Auckland is 12 or 13 hours ahead).
  expect(icuMinute(at, ZONE)).not.toBe(icuMinute(at, "UTC"));
  await expect(page.locator("main")).not.toContainText(/\b\d{1,2}:\d{2}\s?(AM|PM)\b/);
});
