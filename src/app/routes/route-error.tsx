import { isRouteErrorResponse, Link, useRouteError } from "react-router";
import { ChunkNotLoaded } from "../../lib/chunk";
import { useOnline, useWhenOnline } from "../../lib/online";

const reload = () => window.location.reload();
const nothing = () => undefined;

/** The error boundary of every route: a plain explanation and a way back, no stack. */
export function RouteError() {
  const err = useRouteError();
  const notFound = isRouteErrorResponse(err) && err.status === 404;
  const notLoaded = err instanceof ChunkNotLoaded;
  const online = useOnline();
  // A page whose code did not arrive for want of signal opens by itself when the connection returns.
  useWhenOnline(notLoaded ? reload : nothing);
  const [title, text] = notFound
    ? ["Nothing here", "The address does not match a page of Tideline."]
    : notLoaded && !online
      ? [
          "Not kept on this phone yet",
          "This page's code had not been kept on this phone when the connection went: it opens when the connection returns. What you logged is kept on the phone until then.",
        ]
      : notLoaded
        ? [
            "This page could not be loaded",
            "Its code did not arrive. Tideline may have been updated since it was opened here: reload to get the new version. Your saved work is on the server.",
          ]
        : [
            "This page failed to load",
            "Something went wrong while showing this page. Your saved work is on the server; reload to try again.",
          ];
  return (
    <main className="mx-auto max-w-lg p-6">
      <h1 className="text-2xl font-bold">{title}</h1>
      <p className="mt-2 text-mist">{text}</p>
      <div className="mt-4 flex gap-4">
        {/* with no signal a reload could only show the browser's own offline page */}
        {!(notLoaded && !online) && (
          <button type="button" className="underline text-brass-300" onClick={reload}>
            Reload
          </button>
        )}
        <Link to="/">Go to the start page</Link>
      </div>
    </main>
  );
}
