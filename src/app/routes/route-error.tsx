import { isRouteErrorResponse, Link, useRouteError } from "react-router";
import { useOnline, useWhenOnline } from "../../lib/online";

const reload = () => window.location.reload();

/**
 * The error boundary of every route: a plain explanation and a way back, no stack. `inPage`: shown inside the site's
 * layout, whose <main> already holds it (a second main landmark would confuse a screen reader).
 */
export function RouteError({ inPage = false }: { inPage?: boolean }) {
  const err = useRouteError();
  const notFound = isRouteErrorResponse(err) && err.status === 404;
  return (
    <Explained
      inPage={inPage}
      title={notFound ? "Nothing here" : "This page failed to load"}
      text={
        notFound
          ? "The address does not match a page of Tideline."
          : "Something went wrong while showing this page. Your saved work is on the server; reload to try again."
      }
    />
  );
}

/**
 * A page whose code did not arrive (router.tsx `page`): with no signal it says the page is not on the phone yet,
 * offers no reload (with no signal and no service worker a reload could only show the browser's own offline page)
 * and reloads itself when the connection returns; with a signal it suggests a reload (Tideline may have been updated
 * since the page was opened, and the old chunk is gone).
 */
function NotLoaded({ inPage }: { inPage: boolean }) {
  const online = useOnline();
  useWhenOnline(reload);
  return online ? (
    <Explained
      inPage={inPage}
      title="This page could not be loaded"
      text="Its code did not arrive. Tideline may have been updated since it was opened here: reload to get the new version. Your saved work is on the server."
    />
  ) : (
    <Explained
      inPage={inPage}
      offline
      title="Not kept on this phone yet"
      text="This page's code had not been kept on this phone when the connection went: it opens when the connection returns. What you logged is kept on the phone until then."
    />
  );
}
export const PageNotLoaded = () => <NotLoaded inPage={false} />;
export const PageNotLoadedInPage = () => <NotLoaded inPage />;

function Explained({
  inPage,
  offline = false,
  title,
  text,
}: {
  inPage: boolean;
  offline?: boolean;
  title: string;
  text: string;
}) {
  const Frame = inPage ? "section" : "main";
  return (
    <Frame className="mx-auto max-w-lg p-6" aria-labelledby="route-error-title">
      <h1 id="route-error-title" className="text-2xl font-bold">
        {title}
      </h1>
      <p className="mt-2 text-mist">{text}</p>
      <div className="mt-4 flex gap-4">
        {!offline && (
          <button type="button" className="underline text-brass-300" onClick={reload}>
            Reload
          </button>
        )}
        <Link to="/">Go to the start page</Link>
      </div>
    </Frame>
  );
}
