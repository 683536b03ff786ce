import { createBrowserRouter, matchRoutes, type LoaderFunctionArgs, type Params, type RouteObject } from "react-router";
import { paths } from "../config/paths";
import { localDay } from "../lib/clock";
import { queryClient } from "./query-client";
import { PageNotLoaded, PageNotLoadedInPage, RouteError } from "./routes/route-error";

/**
 * Loaders start a page's data fetches while its code chunk downloads, instead of after the
 * session → site → page components have rendered one after another. They never wait:
 * the pages read the same queries from the cache. Feature APIs are imported lazily, so the entry
 * chunk stays small (and zod out of it).
 */
const prefetch = (start: (args: LoaderFunctionArgs) => Promise<unknown>) => (args: LoaderFunctionArgs) => {
  start(args).catch(() => undefined); // a failed prefetch is retried by the page's own query
  return null;
};
const site = (args: LoaderFunctionArgs) => args.params.siteId as string;
const prefetchSession = prefetch(() =>
  import("../features/auth/api").then((m) => queryClient.prefetchQuery(m.sessionQueryOptions())),
);
const prefetchSite = prefetch((a) =>
  import("../features/sites/api").then((m) => queryClient.prefetchQuery(m.siteQueryOptions(site(a)))),
);
const inventory = (
  pick: (
    m: typeof import("../features/inventory/api"),
    a: LoaderFunctionArgs,
  ) => Parameters<typeof queryClient.prefetchQuery>[0],
) => prefetch((a) => import("../features/inventory/api").then((m) => queryClient.prefetchQuery(pick(m, a))));
const prefetchParts = prefetch((a) =>
  Promise.all([import("../features/parts/api"), import("../schemas/parts")]).then(([m, s]) => {
    const parsed = s.listQuery.safeParse(Object.fromEntries(new URL(a.request.url).searchParams));
    return queryClient.prefetchQuery(
      m.partsListQueryOptions(site(a), parsed.success ? parsed.data : { status: "open" }),
    );
  }),
);

/**
 * What a route's page reads whatever it shows, as the feature's query asks for it (the same URL): started by the
 * entry before anything else (`earlyReads`, src/lib/early-reads.ts), so the answers travel while the entry and the
 * route's code are evaluated. tests/client/early-reads.test.ts holds each URL equal to its feature query's.
 */
type Reads = (p: Params, search: URLSearchParams) => string[];
const reads = (urls: Reads): Pick<RouteObject, "handle"> => ({ handle: { reads: urls } });

/**
 * True when the address asks for a list's first, unfiltered view: no query key but those that only arrange the
 * page (`layout`). Its read can then be named without the feature's schemas (zod), which read any other view of
 * the address (the route's loader does, once they have arrived).
 */
const plainView = (search: URLSearchParams, layout: readonly string[] = []) =>
  [...search.keys()].every((k) => layout.includes(k));

const prefetchRegister = prefetch((a) =>
  Promise.all([import("../features/defects/api"), import("../features/defects/url-state")]).then(([m, u]) =>
    queryClient.prefetchQuery(
      m.defectListOptions(site(a), u.apiQuery(u.readState(new URL(a.request.url).searchParams), u.localToday())),
    ),
  ),
);

type PageModule = () => Promise<{ default: React.ComponentType }>;
/**
 * A page whose chunk cannot be fetched (no signal before the service worker kept it, or a version deployed since)
 * is drawn as a page saying so (`PageNotLoaded`), which reloads itself when the connection returns. Not as the
 * route's error: React Router draws nothing below the first route while a matched route's `lazy` has not resolved,
 * so the error would lose the top bar, the sync bar (what is waiting on the phone) and the site's navigation.
 */
const page = (load: PageModule, inPage = false): Pick<RouteObject, "lazy"> => ({
  lazy: () =>
    load().then(
      (m) => ({ Component: m.default }),
      () => ({ Component: inPage ? PageNotLoadedInPage : PageNotLoaded }),
    ),
});
// A page behind sign-in that fails as it is drawn shows the error where the page would be, under the top bar and the
// sync bar, and inside a site under the site's navigation (whose <main> holds it): not on a bare screen.
const shellPage = (load: PageModule) => ({ ...page(load), errorElement: <RouteError /> });
const sitePage = (load: PageModule) => ({ ...page(load, true), errorElement: <RouteError inPage /> });

export const routes: RouteObject[] = [
  { path: paths.signIn.path, ...page(() => import("./routes/auth/sign-in")), errorElement: <RouteError /> },
  { path: paths.safety.path, ...page(() => import("./routes/safety")), errorElement: <RouteError /> },
  { path: paths.invite.path, ...page(() => import("./routes/auth/invite")), errorElement: <RouteError /> },
  { path: paths.resetRequest.path, ...page(() => import("./routes/auth/reset-request")), errorElement: <RouteError /> },
  {
    path: paths.resetPassword.path,
    ...page(() => import("./routes/auth/reset-password")),
    errorElement: <RouteError />,
  },
  { path: paths.shareParts.path, ...page(() => import("./routes/parts/share-parts")), errorElement: <RouteError /> },
  {
    ...page(() => import("./routes/app-layout")),
    loader: prefetchSession,
    ...reads(() => ["/api/session"]),
    errorElement: <RouteError />,
    children: [
      { path: paths.home.path, ...shellPage(() => import("./routes/home-redirect")) },
      { path: paths.sites.path, ...shellPage(() => import("./routes/sites/site-picker")) },
      { path: paths.admin.path, ...shellPage(() => import("./routes/admin/admin-home")) },
      { path: paths.mailbox.path, ...shellPage(() => import("./routes/admin/mailbox")) },
      { path: paths.account.path, ...shellPage(() => import("./routes/account/account")) },
      { path: paths.scan.path, ...shellPage(() => import("./routes/reports/scan")) },
      { path: paths.tag.path, ...shellPage(() => import("./routes/reports/tag")) },
      {
        path: paths.site.path,
        ...shellPage(() => import("./routes/sites/site-layout")),
        loader: prefetchSite,
        ...reads((p) => [`/api/sites/${p.siteId}`]),
        children: [
          {
            index: true,
            ...sitePage(() => import("./routes/sites/site-home")),
            loader: inventory((m, a) => m.overviewQueryOptions(site(a)) as never),
            ...reads((p) => [`/api/sites/${p.siteId}/overview`]),
          },
          { path: "members", ...sitePage(() => import("./routes/sites/members")) },
          { path: "photos", ...sitePage(() => import("./routes/photos/photo-desk")) },
          { path: "photos/shoot-list", ...sitePage(() => import("./routes/photos/shoot-list")) },
          { path: "photos/gallery", ...sitePage(() => import("./routes/photos/gallery")) },
          {
            path: "boards",
            ...sitePage(() => import("./routes/boards/board-list")),
            loader: inventory((m, a) => m.boardsQueryOptions(site(a)) as never),
            ...reads((p) => [`/api/sites/${p.siteId}/boards`]),
          },
          { path: "boards/new", ...sitePage(() => import("./routes/boards/board-new")) },
          {
            path: "boards/:boardId",
            ...sitePage(() => import("./routes/boards/board-elevation")),
            // The board's head and first page (the rest follow in the page, at idle time), and its latest
            // ground-lamp check, whose card below the board comes in a chunk of its own: read with the board, so it
            // is kept for no signal with it.
            loader: prefetch((a) =>
              Promise.all([
                import("../features/inventory/api").then((m) =>
                  queryClient.prefetchInfiniteQuery(m.boardQueryOptions(site(a), a.params.boardId as string)),
                ),
                import("../features/readings/latest-ground-check").then((m) =>
                  queryClient.prefetchQuery(m.latestGroundQueryOptions(site(a), a.params.boardId as string)),
                ),
              ]),
            ),
            ...reads((p) => [
              `/api/sites/${p.siteId}/boards/${p.boardId}`,
              `/api/sites/${p.siteId}/boards/${p.boardId}/ground-checks/latest`,
            ]),
          },
          { path: "boards/:boardId/setup", ...sitePage(() => import("./routes/boards/board-setup")) },
          { path: "log", ...sitePage(() => import("./routes/boards/quick-log")) },
          { path: "inventory/import", ...sitePage(() => import("./routes/boards/inventory-import")) },
          { path: "flood", ...sitePage(() => import("./routes/boards/flood-events")) },
          {
            path: "defects",
            ...sitePage(() => import("./routes/defects/register")),
            loader: prefetchRegister,
            // The register's first view (its default sort and page, as of today) and the filter choices it offers.
            // `hide` and `cols` only arrange its columns (url-state.ts `apiQuery` leaves them out).
            ...reads((p, search) =>
              plainView(search, ["hide", "cols"])
                ? [
                    `/api/sites/${p.siteId}/defects?today=${localDay(new Date())}`,
                    `/api/sites/${p.siteId}/defects/options`,
                  ]
                : [`/api/sites/${p.siteId}/defects/options`],
            ),
          },
          { path: "defects/new", ...sitePage(() => import("./routes/defects/raise")) },
          { path: "defects/how-priority-works", ...sitePage(() => import("./routes/defects/priority-help")) },
          { path: "defects/:defectId", ...sitePage(() => import("./routes/defects/detail")) },
          { path: "repair-plan", ...sitePage(() => import("./routes/defects/repair-plan")) },
          { path: "readings", ...sitePage(() => import("./routes/readings/readings-home")) },
          { path: "readings/criteria", ...sitePage(() => import("./routes/readings/criteria")) },
          { path: "readings/boards/:boardId", ...sitePage(() => import("./routes/readings/board-readings")) },
          {
            path: "readings/components/:componentId",
            ...sitePage(() => import("./routes/readings/component-readings")),
          },
          { path: "return-to-service", ...sitePage(() => import("./routes/return-to-service/overview")) },
          { path: "return-to-service/settings", ...sitePage(() => import("./routes/return-to-service/settings")) },
          {
            path: "boards/:boardId/return-to-service",
            ...sitePage(() => import("./routes/return-to-service/board-rts")),
          },
          { path: "boards/:boardId/watch", ...sitePage(() => import("./routes/return-to-service/watch")) },
          {
            path: "boards/:boardId/return-to-service/stages/:stageId/sheet",
            ...sitePage(() => import("./routes/return-to-service/stage-sheet")),
          },
          {
            path: "parts",
            ...sitePage(() => import("./routes/parts/parts-list")),
            loader: prefetchParts,
            // The wanted list's first view: the lines still open (schemas/parts.ts `listQuery`'s default).
            ...reads((p, search) => (plainView(search) ? [`/api/sites/${p.siteId}/parts?status=open`] : [])),
          },
          { path: "reports", ...sitePage(() => import("./routes/reports/reports")) },
          { path: "parts/print", ...sitePage(() => import("./routes/parts/parts-print")) },
          { path: "parts/:lineId", ...sitePage(() => import("./routes/parts/part-line")) },
          { path: "*", ...sitePage(() => import("./routes/not-found")) },
        ],
      },
      { path: "*", ...shellPage(() => import("./routes/not-found")) },
    ],
  },
];

/** The URLs the matched routes read whatever they show (their `reads`), outermost first. */
export const readsOf = (
  matches: ReadonlyArray<{ route: RouteObject; params: Params }> | null,
  search: URLSearchParams,
): string[] =>
  (matches ?? []).flatMap((m) => (m.route.handle as { reads?: Reads } | undefined)?.reads?.(m.params, search) ?? []);

/**
 * The reads for an address (`/path?query`), matched by React Router's `matchRoutes` (which flattens and ranks every
 * route on each call). The app itself takes them from the router's own first matches instead (src/main.tsx), so the
 * routes are flattened once per page start; this one is for tests and anything without a router.
 */
export const earlyReads = (address: string): string[] => {
  const url = new URL(address, "http://x");
  return readsOf(matchRoutes(routes, url.pathname), url.searchParams);
};

export const createRouter = () => createBrowserRouter(routes);
