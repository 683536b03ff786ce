import type { ReactNode } from "react";
import { ApiError } from "../lib/api-client";

export function Loading({ what = "Loading" }: { what?: string }) {
  return (
    <p role="status" className="p-4 text-mist">
      {what}…
    </p>
  );
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
