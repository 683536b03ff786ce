import AxeBuilder from "@axe-core/playwright";
import { expect, type Page } from "@playwright/test";

/**
 * The accessibility scan every page's e2e test can call: WCAG 2 A/AA rules through
 * axe-core; any serious or critical violation fails the test with a readable list.
 */
export async function expectNoSeriousA11yViolations(page: Page, context = "page") {
  const result = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa"]).analyze();
  const bad = result.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
  const summary = bad.map(
    (v) =>
      `${v.impact}: ${v.id} — ${v.help} (${v.nodes
        .map((n) => n.target.join(" "))
        .slice(0, 3)
        .join("; ")})`,
  );
  expect(summary, `accessibility violations on ${context}`).toEqual([]);
}
