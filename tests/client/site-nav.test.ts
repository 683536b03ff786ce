/**
 * Which item of the site's navigation stands for a page below its own (src/config/nav.ts `within`, `isWithin`). The
 * pages are addressed as the router has them (src/app/router.tsx): each address below is checked to be a real route
 * with React Router's own `matchRoutes`, so a route renamed without its navigation fails here.
 */
import { matchRoutes } from "react-router";
import { describe, expect, it } from "vitest";
import { isWithin, SITE_NAV } from "../../src/config/nav";
import { routes } from "../../src/app/router";

const SITE = "0b7e3f62-5b1a-4d0e-9c2f-7a1d2e3f4a5b";
const ID = "5d2c1b0a-9e8f-4a7b-8c6d-5e4f3a2b1c0d";
const under = (pathname: string) => SITE_NAV.filter((i) => isWithin(i, SITE, pathname)).map((i) => i.label);

describe("the site's navigation marks where a page below its own belongs", () => {
  const cases: Array<[string, string[]]> = [
    [`/boards/${ID}`, ["Boards"]],
    [`/boards/${ID}/setup`, ["Boards"]],
    ["/boards/new", ["Boards"]],
    [`/boards/${ID}/return-to-service`, ["Return to service"]],
    [`/boards/${ID}/return-to-service/stages/${ID}/sheet`, ["Return to service"]],
    [`/boards/${ID}/watch`, ["Return to service"]],
    ["/return-to-service/settings", ["Return to service"]],
    [`/defects/${ID}`, ["Defects"]],
    ["/defects/new", ["Defects"]],
    ["/defects/how-priority-works", ["Defects"]],
    [`/readings/boards/${ID}`, ["Readings"]],
    [`/readings/components/${ID}`, ["Readings"]],
    ["/readings/criteria", ["Readings"]],
    [`/parts/${ID}`, ["Wanted parts"]],
    ["/parts/print", ["Wanted parts"]],
    // the items' own pages are marked by their links, exactly; these stand for nothing else
    ["/boards", []],
    ["/defects", []],
    ["/photos/gallery", []],
    ["/log", []],
  ];
  it.each(cases)("%s → %j", (path, labels) => {
    const full = `/sites/${SITE}${path}`;
    const matched = matchRoutes(routes, full);
    expect(matched, `${full} is a page of the router`).not.toBeNull();
    expect(matched!.at(-1)!.route.path, `${full} is not the not-found page`).not.toBe("*");
    expect(under(full)).toEqual(labels);
  });

  it("another site's pages, and pages outside a site, stand for nothing here", () => {
    expect(under(`/sites/${ID}/boards/${ID}`)).toEqual([]);
    expect(under(`/scan`)).toEqual([]);
    expect(under(`/sites/${SITE}`)).toEqual([]);
  });
});
