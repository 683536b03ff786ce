import { type ReactNode } from "react";
import { ApiError } from "../lib/api-client";
import { useOnline } from "../lib/online";

export function Loading({ what = "Loading" }: { what?: string }) {
  // With no signal a read that this phone never kept waits for the connection (it is paused, not
  // failed): say so rather than spin.
  const online = useOnline();
  return (
    <p role="status" className="p-4 text-mist" data-testid={online ? undefined : "not-on-phone"}>
      {online ? `${what}…` : "Not kept on this phone yet: this opens when the connection returns."}
    </p>
  );
}

/**
 * Did the server refuse this read for a reason asking again will not fix (a 4xx other than 408/429:
 * the record is gone, or no longer this person's to see)? Then the page shows the ErrorPanel even
 * when it holds an earlier copy. A read that failed for want of an answer (no signal, a dead Wi-Fi,
 * a 5xx) keeps showing what the page already holds, and the sync bar marks it as the copy last synced.
 * Pages check `q.isLoadingError || serverRefused(q.error)` — a failed read with nothing
 * to show, or a refusal — never bare `isError`.
 */
export function serverRefused(error: unknown): boolean {
  return error instanceof ApiError && error.status >= 400 && error.status < 500 && ![408, 429].includes(error.status);
}

export function ErrorPanel({ error, children }: { error: unknown; children?: ReactNode }) {
  const message = error instanceof ApiError ? error.message : "Something went wrong while loading this page.";
  return (
    <div role="alert" className="rounded-md border border-flare-400 bg-flare-700/30 p-4 text-chalk">
      <p className="font-semibold">{message}</p>
      {error instanceof ApiError && error.requestId && !message.includes(error.requestId) && (
        <p className="mt-1 text-sm text-mist">
          Reference <span className="font-mono">{error.requestId}</span>
        </p>
      )}
      {children}
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-hull-500 p-6 text-center">
      <p className="text-lg font-semibold">{title}</p>
      <div className="mt-2 text-mist">{children}</div>
    </div>
  );
}
