import { useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { SafetyNotice } from "../../../components/safety-notice";
import { EmptyState, ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { applyInventoryChange, useBoard, useBoards } from "../../../features/inventory/api";
import { LabelsForm } from "../../../features/reports/components/labels-form";
import { ReportForm } from "../../../features/reports/components/report-form";
import { can } from "../../../domain/permissions";
import { useSiteContext } from "../sites/site-layout";
import { usePrepareFile } from "../../../features/prepared-files/api";
import { PreparedFilesPanel } from "../../../features/prepared-files/components/prepared-files-panel";

/** Reports and labels: the condition survey PDF for everyone on the site, tag labels for the crew who handle parts. */
export default function ReportsPage() {
  const { site, role } = useSiteContext();
  const boards = useBoards(site.id);
  const [labelBoard, setLabelBoard] = useState("");
  const boardId = labelBoard || boards.data?.[0]?.id || "";
  const detail = useBoard(site.id, boardId);
  const qc = useQueryClient();
  const canLabel = can(role, "reports.labels");
  const prepare = usePrepareFile(site.id);

  return (
    <div className="space-y-6">
      <header>
        <h1 className="text-2xl font-bold">Reports and labels</h1>
        <p className="text-mist">
          Hand the survey to owners, insurers, sponsors and the heritage body; print tags for tag-and-bag.
        </p>
      </header>
      {boards.isPending && <Loading what="Loading the boards" />}
      {(boards.isLoadingError || serverRefused(boards.error)) && <ErrorPanel error={boards.error} />}
      {boards.data && boards.data.length === 0 && (
        <EmptyState title="No boards yet">A report needs at least one board.</EmptyState>
      )}
      {boards.data && boards.data.length > 0 && (
        <>
          <section className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
            <ReportForm
              siteId={site.id}
              siteName={site.name}
              boards={boards.data}
              preparing={prepare.isPending}
              onPrepare={(params) =>
                prepare.mutate(
                  { kind: "survey_report", params },
                  { onSuccess: () => document.getElementById("prepared-files")?.scrollIntoView({ block: "start" }) },
                )
              }
            />
            {prepare.isError && <ErrorPanel error={prepare.error} />}
          </section>
          <PreparedFilesPanel siteId={site.id} />
          {canLabel && (
            <section className="rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
              {(detail.isLoadingError || serverRefused(detail.error)) && <ErrorPanel error={detail.error} />}
              <LabelsForm
                siteId={site.id}
                boards={boards.data}
                boardId={boardId}
                onBoardChange={setLabelBoard}
                sections={detail.data?.sections ?? []}
                positions={(detail.data?.complete ? detail.data.positions : []).map((p) => ({
                  id: p.id,
                  designation: p.designation,
                  sectionId: p.sectionId,
                  tagNumber: p.component?.tagNumber ?? null,
                  hasComponent: !!p.component,
                }))}
                canAssign={can(role, "tags.assign")}
                // New tags show on this board's tiles and position details only: read that board again, not the site.
                onTagsAssigned={(assignedOn) =>
                  void applyInventoryChange(qc, site.id, { kind: "board", boardId: assignedOn })
                }
              />
            </section>
          )}
          <SafetyNotice />
        </>
      )}
    </div>
  );
}
