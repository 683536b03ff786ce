/** Shown instead of a page whose writes the role cannot make (the server refuses them anyway). */
export function RoleNotice({ children }: { children: React.ReactNode }) {
  return (
    <p role="note" className="rounded-md bg-hull-850 p-4 text-mist ring-1 ring-hull-700">
      {children}
    </p>
  );
}
