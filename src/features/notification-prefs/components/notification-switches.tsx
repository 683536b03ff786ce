import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { ApiError } from "../../../lib/api-client";
import { NOTIFICATION_LABELS } from "../../../schemas/account";
import { useNotificationPrefs, useSetNotification } from "../api";

/** One switch per kind of e-mail; each flips on its own, so two tabs never undo each other. */
export function NotificationSwitches() {
  const prefs = useNotificationPrefs();
  const set = useSetNotification();
  return (
    <section aria-labelledby="notif-title" className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="notif-title" className="text-lg font-semibold">
        E-mail notifications
      </h2>
      {prefs.isPending && <Loading what="Loading your settings" />}
      {(prefs.isLoadingError || serverRefused(prefs.error)) && <ErrorPanel error={prefs.error} />}
      {set.isError && (
        <p role="alert" className="text-flare-300">
          {set.error instanceof ApiError ? set.error.message : "The change was not saved."}
        </p>
      )}
      {prefs.data?.length === 0 && (
        <p className="text-sm text-mist">
          None of your roles receives e-mail from Tideline, so there is nothing to switch here. A curator who gives you
          another role on a site also gives you its e-mails.
        </p>
      )}
      <ul className="space-y-2">
        {prefs.data?.map((p) => (
          <li key={p.key}>
            <label className="flex min-h-11 cursor-pointer items-start gap-3 rounded-md p-2 hover:bg-hull-800">
              <input
                type="checkbox"
                role="switch"
                className="mt-1 h-6 w-6 shrink-0 accent-brass-400"
                checked={p.enabled}
                disabled={set.isPending}
                onChange={(e) => set.mutate({ key: p.key, enabled: e.target.checked })}
                aria-describedby={`hint-${p.key}`}
              />
              <span>
                <span className="block font-semibold">
                  {NOTIFICATION_LABELS[p.key].label}{" "}
                  <span className="text-sm font-normal text-mist">({p.enabled ? "on" : "off"})</span>
                </span>
                <span id={`hint-${p.key}`} className="block text-sm text-mist">
                  {NOTIFICATION_LABELS[p.key].hint}
                </span>
              </span>
            </label>
          </li>
        ))}
      </ul>
    </section>
  );
}
