/**
 * Under a list of readings that holds only the newest: how many there are in all and where the rest are.
 * Nothing when the list holds every one.
 */
export function ListedOf({ listed, total, where }: { listed: number; total: number; where: string }) {
  if (total <= listed) return null;
  return (
    <p className="text-sm text-mist" data-testid="listed-of">
      The newest {listed.toLocaleString("en")} of {total.toLocaleString("en")} are listed here; {where}.
    </p>
  );
}
