import { isRouteErrorResponse, Link, useRouteError } from "react-router";

/** The error boundary of every route: a plain explanation and a way back, no stack. */
export function RouteError() {
  const err = useRouteError();
  const notFound = isRouteErrorResponse(err) && err.status === 404;
  return (
    <main className="mx-auto max-w-lg p-6">
      <h1 className="text-2xl font-bold">{notFound ? "Nothing here" : "This page failed to load"}</h1>
      <p className="mt-2 text-mist">
        {notFound
          ? "The address does not match a page of Tideline."
          : "Something went wrong while showing this page. Your saved work is on the server; reload to try again."}
      </p>
      <div className="mt-4 flex gap-4">
        <button type="button" className="underline text-brass-300" onClick={() => window.location.reload()}>
          Reload
        </button>
        <Link to="/">Go to the start page</Link>
      </div>
    </main>
  );
}
