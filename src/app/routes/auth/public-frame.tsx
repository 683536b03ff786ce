import type { ReactNode } from "react";
import { Link } from "react-router";
import { Wordmark } from "../../../components/wordmark";
import { paths } from "../../../config/paths";

/** The signed-out pages' frame (invitation, password reset): mark, title, one narrow column. */
export function PublicFrame({ title, intro, children }: { title: string; intro?: ReactNode; children: ReactNode }) {
  return (
    <main id="main" className="flex min-h-dvh items-center justify-center p-4">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-center">
          <Wordmark />
          <h1 className="mt-4 text-2xl font-bold">{title}</h1>
          {intro && <p className="mt-1 text-mist">{intro}</p>}
        </div>
        {children}
        <p className="mt-4 text-center text-sm">
          <Link to={paths.signIn.href()}>Back to sign in</Link>
        </p>
      </div>
    </main>
  );
}
