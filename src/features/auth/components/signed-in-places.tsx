import { Button } from "../../../components/button";
import { ErrorPanel, Loading, serverRefused } from "../../../components/status";
import { useSignedInPlaces, useSignOutElsewhere } from "../api";

const placesIn = (n: number) => (n === 1 ? "1 place" : `${n.toLocaleString("en")} places`);

/**
 * Where the account is signed in, and signing out of all but this browser: the phone left in a machinery space, a
 * shared laptop in the site office. If the account's owner cannot reach any browser, an instance admin can suspend
 * it instead.
 */
export function SignedInPlaces() {
  const places = useSignedInPlaces();
  const out = useSignOutElsewhere();
  return (
    <section aria-labelledby="places-title" className="space-y-3 rounded-lg bg-hull-850 p-4 ring-1 ring-hull-700">
      <h2 id="places-title" className="text-lg font-semibold">
        Where you are signed in
      </h2>
      {places.isPending && <Loading what="Counting" />}
      {(places.isLoadingError || serverRefused(places.error)) && <ErrorPanel error={places.error} />}
      {places.data != null && (
        <p>
          {places.data > 1
            ? `${places.data.toLocaleString("en")} places are signed in to this account, this one included.`
            : "Only this place is signed in to this account."}
        </p>
      )}
      {out.isError && (
        <p role="alert" className="text-flare-300">
          {out.error.message || "Nothing was signed out. Try again."}
        </p>
      )}
      {out.data && (
        <p role="status" className="text-kelp-300">
          {out.data.ended === 0
            ? "There was nowhere else to sign out of."
            : `Signed out of ${placesIn(out.data.ended)}. Anyone there must sign in again.`}
        </p>
      )}
      <Button tone="quiet" disabled={out.isPending || places.data === 1} onClick={() => out.mutate()}>
        Sign out everywhere else
      </Button>
      <p className="text-sm text-mist">
        A phone or laptop you no longer have? This signs it out now. Changing your password does the same.
      </p>
    </section>
  );
}
