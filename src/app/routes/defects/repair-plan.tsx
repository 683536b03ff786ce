import { Link, useSearchParams } from "react-router";
import { Button } from "../../../components/button";
import { SafetyNotice } from "../../../components/safety-notice";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { paths } from "../../../config/paths";
import { useBoardRepairPlan, useRepairPlan } from "../../../features/defects/api";
import { PlanTotals, RepairPlanSheet } from "../../../features/defects/components/repair-plan";
import { useSiteContext } from "../sites/site-layout";
import { can } from "../../../domain/permissions";

export default function RepairPlanPage() {
  const { site, role } = useSiteContext();
  const plan = useRepairPlan(site.id);
  const [params] = useSearchParams();
  // The board asked for, else the board holding the site's most urgent open defect.
  const asked = params.get("board");
  const chosen =
    asked && plan.data?.boards.some((b) => b.boardId === asked)
      ? asked
      : (plan.data?.boards.reduce<{ boardId: string; firstRank: number } | null>(
          (best, b) => (!best || b.firstRank < best.firstRank ? b : best),
          null,
        )?.boardId ?? null);
  const boardPlan = useBoardRepairPlan(site.id, chosen);
  if (!can(role, "defects.manage"))
    return (
      <EmptyState title="The repair plan is the curator's page">
        Follow the work in the{" "}
        <Link className="underline" to={paths.defects.href(site.id)}>
          defect register
        </Link>
        .
      </EmptyState>
    );
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <div>
          <h1 className="text-2xl font-bold">Repair plan — {site.name}</h1>
          <p className="text-mist">
            Open work by board and section, in priority order (pins applied). Printing prints the chosen board.{" "}
            <Link className="no-print underline" to={paths.priorityHelp.href(site.id)}>
              How priority works
            </Link>
          </p>
        </div>
        <Button className="no-print" onClick={() => window.print()}>
          Print the plan
        </Button>
      </div>
      <SafetyNotice compact />
      {plan.isPending && <Loading what="Working out the plan" />}
      {(plan.isLoadingError || serverRefused(plan.error)) && <ErrorPanel error={plan.error} />}
      {plan.data && (
        <div className="no-print">
          <PlanTotals
            plan={plan.data}
            chosen={chosen}
            boardHref={(boardId) => `${paths.repairPlan.href(site.id)}?board=${boardId}`}
          />
        </div>
      )}
      {chosen && boardPlan.isPending && <Loading what="Listing the board's defects" />}
      {(boardPlan.isLoadingError || serverRefused(boardPlan.error)) && <ErrorPanel error={boardPlan.error} />}
      {boardPlan.data && <RepairPlanSheet siteId={site.id} plan={boardPlan.data} />}
    </div>
  );
}
