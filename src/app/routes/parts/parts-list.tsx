import { Suspense } from "react";
import { Link } from "react-router";
import { laterPart } from "../../../components/later-part";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { csvUrl, usePartsList } from "../../../features/parts/api";
import { BudgetPanel } from "../../../features/parts/components/budget-panel";
import { PartsFilters } from "../../../features/parts/components/parts-filters";
import { PartsPager } from "../../../features/parts/components/parts-pager";
import { PartsTable } from "../../../features/parts/components/parts-table";
import { useFilterParams } from "../../../features/parts/use-filter-params";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";
import { useLoadWhenIdle } from "../../../lib/when-idle";

/*
 * The forms below the list (a line added by hand, the site's currency, the share links) come in chunks of their own,
 * asked for when first drawn and at idle time once the list is on screen, so the list's first paint on a phone does
 * not wait for their code (the form helpers, the currency codes, the share links' reads).
 */
const loadNewLine = () => import("../../../features/parts/components/new-line-form");
const loadCurrency = () => import("../../../features/sites/components/currency-form");
const loadShareLinks = () => import("../../../features/parts/components/share-links-panel");
const NewLineForm = laterPart("The form for a new line", () => loadNewLine().then((m) => m.NewLineForm));
const CurrencyForm = laterPart("The currency setting", () => loadCurrency().then((m) => m.CurrencyForm));
const ShareLinksPanel = laterPart("The share links", () => loadShareLinks().then((m) => m.ShareLinksPanel));
const LATER = [loadNewLine, loadCurrency, loadShareLinks];

export default function PartsListPage() {
  const { site, role } = useSiteContext();
  const [filter, setFilter, search] = useFilterParams();
  const list = usePartsList(site.id, filter);
  const canEdit = can(role, "parts.edit");
  useLoadWhenIdle(!!list.data, LATER);
  return (
    <div className="space-y-5">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1 className="text-2xl font-bold">Wanted parts</h1>
          <p className="text-mist">
            Everything the register says to replace or source, one line per specification, plus what was added by hand.
          </p>
        </div>
        <div className="no-print flex flex-wrap gap-2">
          <a
            href={csvUrl(site.id, filter)}
            download
            className="inline-flex min-h-11 items-center rounded-md bg-hull-800 px-4 font-semibold text-chalk no-underline ring-1 ring-hull-600"
          >
            Export CSV
          </a>
          <Link
            to={paths.partsPrint.href(site.id, search)}
            className="inline-flex min-h-11 items-center rounded-md bg-hull-800 px-4 font-semibold text-chalk no-underline ring-1 ring-hull-600"
          >
            Print wanted list
          </Link>
        </div>
      </header>
      <PartsFilters
        value={filter}
        boards={list.data?.boards ?? []}
        onChange={(change) => setFilter({ ...change, page: undefined })}
      />
      {list.isPending && <Loading what="Gathering the wanted list" />}
      {(list.isLoadingError || serverRefused(list.error)) && <ErrorPanel error={list.error} />}
      {list.data &&
        (list.data.lines.length ? (
          <>
            <PartsTable
              siteId={site.id}
              lines={list.data.lines}
              busy={list.isPlaceholderData}
              sort={filter.sort}
              dir={filter.dir}
              onSort={(change) => setFilter({ ...change, page: undefined })}
            />
            <PartsPager
              total={list.data.total}
              page={list.data.page}
              size={list.data.size}
              onPage={(page, size) => setFilter({ page, size })}
            />
          </>
        ) : (
          <EmptyState title="Nothing on the list for this filter">
            Set a component's disposition to replace or source, mark a defect's parts as wanted, or add a part by hand.
          </EmptyState>
        ))}
      {/* What sits below the list waits for it: drawn above a list still loading, it would be pushed down the
          screen when the rows arrive (a layout shift on the phone). */}
      {list.data && (
        <>
          {canEdit && (
            <Suspense fallback={<Loading what="Opening the form for a new line" />}>
              <NewLineForm siteId={site.id} />
            </Suspense>
          )}
          <div className="grid gap-4 lg:grid-cols-2">
            <BudgetPanel
              budget={list.data.budget}
              settings={
                <Suspense fallback={null}>
                  <CurrencyForm siteId={site.id} currency={site.currency} canEdit={can(role, "site.settings")} />
                </Suspense>
              }
            />
            {canEdit && (
              <Suspense fallback={<Loading what="Reading the share links" />}>
                <ShareLinksPanel siteId={site.id} canRevoke={can(role, "parts.revoke_share")} />
              </Suspense>
            )}
          </div>
        </>
      )}
    </div>
  );
}
