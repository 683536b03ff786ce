import { useRef, useState } from "react";
import { z } from "zod";
import { Button } from "../../../components/button";
import { SelectField, TextField } from "../../../components/field";
import { ErrorPanel } from "../../../components/status";
import { fieldError, formMessage, useSchemaForm } from "../../../lib/form";
import {
  REPORT_SECTIONS,
  REPORT_SECTION_LABELS,
  surveyReportQuery,
  type SurveyReportQuery,
} from "../../../schemas/reports";
import { fetchPdf, surveyReportParams, surveyReportUrl, type Progress } from "../api";
import { DownloadProgress } from "./download-progress";
import { SaveLink } from "./save-link";
import { localDay } from "../../../lib/clock";

interface Props {
  siteId: string;
  siteName: string;
  boards: Array<{ id: string; name: string; positionCount: number }>;
  /** Asks for the same report as a background job (the page composes the prepared-files feature). */
  onPrepare?: (params: Record<string, string>) => void;
  preparing?: boolean;
}

/** The form's inputs → the report's query; surveyReportQuery (the server's own schema) validates it. */
const reportForm = z
  .object({
    boardId: z.string(),
    sections: z.array(z.string()),
    photos: z.boolean(),
    from: z.string(),
    to: z.string(),
    paper: z.string(),
  })
  .transform(
    (v) =>
      ({
        boardId: v.boardId || undefined,
        // In the report's order, whatever order they were ticked in.
        sections: REPORT_SECTIONS.filter((s) => v.sections.includes(s)),
        photos: v.photos ? "yes" : "no",
        from: v.from || undefined,
        to: v.to || undefined,
        paper: v.paper,
      }) as z.input<typeof surveyReportQuery>,
  )
  .pipe(surveyReportQuery);

/** Options of the condition survey PDF, then its progress while the server renders it, then the file. */
export function ReportForm({ siteId, siteName, boards, onPrepare, preparing = false }: Props) {
  const form = useSchemaForm(reportForm, {
    boardId: boards[0]?.id ?? "",
    sections: [...REPORT_SECTIONS],
    photos: true,
    from: "",
    to: "",
    paper: "a4",
  });
  const { register, formState } = form;
  const errors = formState.errors;
  const e = (name: "boardId" | "sections" | "from" | "to" | "paper") => fieldError(errors, name);
  const [boardId, sections, from, to] = form.watch(["boardId", "sections", "from", "to"]);
  const [progress, setProgress] = useState<Progress | null>(null);
  const [result, setResult] = useState<{ blob: Blob; filename: string } | null>(null);
  const [error, setError] = useState<unknown>(null);
  const abort = useRef<AbortController | null>(null);
  const busy = progress !== null && result === null && error === null;

  const board = boards.find((b) => b.id === boardId);
  const slug = `${siteName}${board ? `-${board.name}` : ""}`
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-|-$/g, "");

  async function make(query: SurveyReportQuery) {
    setResult(null);
    setError(null);
    setProgress({ pages: 0, totalPages: null, bytes: 0 });
    abort.current = new AbortController();
    try {
      const blob = await fetchPdf(surveyReportUrl(siteId, query), setProgress, abort.current.signal);
      setResult({ blob, filename: `condition-survey-${slug}-${localDay(new Date())}.pdf` });
    } catch (e) {
      if ((e as Error).name === "AbortError") setProgress(null);
      else setError(e);
    }
  }
  /** The same options as the direct download's query, for the background job. */
  const prepare = form.handleSubmit((query) => onPrepare?.(surveyReportParams(query)));
  const message = formMessage(errors);

  return (
    <form
      className="space-y-4"
      onSubmit={(ev) => void form.handleSubmit((query) => !busy && make(query))(ev)}
      noValidate
      aria-labelledby="report-form-title"
    >
      <h2 id="report-form-title" className="text-xl font-bold">
        Condition survey (PDF)
      </h2>
      <p className="text-sm text-mist">
        For owners, insurers, sponsors and the heritage body: cover, contents, summary, the board front, every position
        with its photos and readings, dry-out charts, the defect register and the parts wanted, ending with the safety
        caution. It records observations and readings; it certifies nothing.
      </p>
      {message && (
        <p role="alert" className="text-flare-300">
          {message}
        </p>
      )}
      <div className="grid gap-3 sm:grid-cols-2">
        <SelectField label="Board" {...register("boardId")} disabled={busy} error={e("boardId")}>
          {boards.map((b) => (
            <option key={b.id} value={b.id}>
              {b.name} ({b.positionCount} positions)
            </option>
          ))}
          <option value="">Whole site: every board</option>
        </SelectField>
        <SelectField label="Paper" {...register("paper")} disabled={busy} error={e("paper")}>
          <option value="a4">A4</option>
          <option value="letter">US Letter</option>
        </SelectField>
        <TextField
          label="Observations from (optional)"
          type="date"
          {...register("from")}
          max={to || undefined}
          disabled={busy}
          error={e("from")}
        />
        <TextField
          label="Observations to (optional)"
          type="date"
          {...register("to")}
          min={from || undefined}
          disabled={busy}
          error={e("to")}
          hint="Inspections, readings and photos outside the dates are left out."
        />
      </div>
      <fieldset className="space-y-2">
        <legend className="text-sm font-semibold text-mist">
          Sections (cover, contents and the safety caution are always in)
        </legend>
        <div className="grid gap-1 sm:grid-cols-2">
          {REPORT_SECTIONS.map((s) => (
            <label key={s} className="flex min-h-11 items-center gap-3">
              <input
                type="checkbox"
                className="size-5 accent-brass-400"
                {...register("sections")}
                value={s}
                disabled={busy}
              />
              {REPORT_SECTION_LABELS[s]}
            </label>
          ))}
        </div>
        <label className="flex min-h-11 items-center gap-3">
          <input type="checkbox" className="size-5 accent-brass-400" {...register("photos")} disabled={busy} />
          Include photos (as found and after work, downscaled)
        </label>
      </fieldset>
      <div className="flex flex-wrap gap-3">
        <Button type="submit" disabled={busy || sections.length === 0}>
          {busy ? "Making the report…" : "Make the report"}
        </Button>
        {busy && (
          <Button tone="quiet" onClick={() => abort.current?.abort()}>
            Stop
          </Button>
        )}
        {onPrepare && (
          <Button tone="quiet" disabled={busy || preparing || sections.length === 0} onClick={(ev) => void prepare(ev)}>
            Prepare in the background
          </Button>
        )}
      </div>
      {onPrepare && (
        <p className="text-sm text-mist">
          A whole site, or a board with many photos, can take minutes: prepare it in the background and carry on. You
          get a notice here and an e-mail when the file is ready.
        </p>
      )}
      {sections.length === 0 && (
        <p className="text-sm text-flare-300" role="alert">
          Choose at least one section.
        </p>
      )}
      {progress && !result && !error && <DownloadProgress progress={progress} label="Report pages received" />}
      {error !== null && <ErrorPanel error={error} />}
      {result && <SaveLink blob={result.blob} filename={result.filename} />}
    </form>
  );
}
