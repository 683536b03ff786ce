import { lazy, useReducer, type ComponentType, type ReactNode } from "react";
import { ErrorBoundary } from "react-error-boundary";
import { ChunkNotLoaded, markChunk } from "../lib/chunk";
import { useOnline, useWhenOnline } from "../lib/online";

/** What a part shows in place of code that did not arrive; asks again by itself when the connection returns. */
function NotLoaded({ what, retry }: { what: string; retry: () => void }) {
  const online = useOnline();
  useWhenOnline(retry);
  return (
    <div
      role="status"
      className="rounded-md border border-dashed border-hull-500 p-4 text-mist"
      data-testid="part-not-loaded"
    >
      <p>
        {online
          ? `${what} could not be loaded. Try again; if it still fails, Tideline may have been updated since this page was opened: reload it.`
          : `${what} is not kept on this phone yet: it opens when the connection returns.`}
      </p>
      <div className="mt-2 flex flex-wrap gap-3">
        <button type="button" className="min-h-11 rounded-md px-4 ring-1 ring-hull-600" onClick={retry}>
          Try again
        </button>
        {online && (
          <button
            type="button"
            className="min-h-11 rounded-md px-4 ring-1 ring-hull-600"
            onClick={() => window.location.reload()}
          >
            Reload the page
          </button>
        )}
      </div>
    </div>
  );
}

type Options<P> = {
  /** Wraps the "not loaded" message, given the part's own props (the position panel's drawer, with its close). */
  frame?: (message: ReactNode, props: P) => ReactNode;
  /** Shows nothing in its place when it did not arrive (a notice that is not the page's business); still retries. */
  quiet?: boolean;
};

/**
 * A part of a page whose code comes in a chunk of its own (React.lazy, under the page's Suspense): when the chunk
 * cannot be fetched, the part — not the whole page — says so, offers to try again and tries again by itself when the
 * connection returns. React.lazy keeps a failed load for good, so a retry makes a new one. A fault in the part's own
 * code still goes to the route's error page, as before.
 */
export function laterPart<P extends object>(
  what: string,
  load: () => Promise<ComponentType<P>>,
  { frame, quiet }: Options<P> = {},
): ComponentType<P> {
  const make = () => lazy(() => markChunk(what, load)().then((c) => ({ default: c })));
  let Current = make();
  function LaterPart(props: P) {
    const [, rerender] = useReducer((n: number) => n + 1, 0);
    const Part = Current;
    return (
      <ErrorBoundary
        fallbackRender={({ error, resetErrorBoundary }) => {
          if (!(error instanceof ChunkNotLoaded)) throw error;
          if (quiet) return <Retrying retry={resetErrorBoundary} />;
          const message = <NotLoaded what={what} retry={resetErrorBoundary} />;
          return frame ? frame(message, props) : message;
        }}
        onReset={() => {
          Current = make();
          rerender();
        }}
      >
        <Part {...props} />
      </ErrorBoundary>
    );
  }
  LaterPart.displayName = `LaterPart(${what})`;
  return LaterPart;
}

/** The quiet form: nothing on screen, a retry when the connection returns. */
function Retrying({ retry }: { retry: () => void }) {
  useWhenOnline(retry);
  return null;
}
