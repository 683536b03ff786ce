import { Link, Navigate, useSearchParams } from "react-router";
import { paths } from "../../../config/paths";
import { Wordmark } from "../../../components/wordmark";
import { SignInForm } from "../../../features/auth/components/sign-in-form";
import { useSession } from "../../../features/auth/api";

export default function SignInPage() {
  const [params] = useSearchParams();
  const next = params.get("next");
  const safeNext = next && next.startsWith("/") && !next.startsWith("//") ? next : "/";
  const session = useSession();
  if (session.data) return <Navigate to={safeNext} replace />;
  return (
    <main id="main" className="flex min-h-dvh items-center justify-center p-4">
      <div className="w-full max-w-sm">
        <div className="mb-6 text-center">
          <Wordmark />
          <h1 className="mt-4 text-2xl font-bold">Sign in</h1>
          <p className="mt-1 text-mist">Condition survey and repair register for flood-damaged switchboards.</p>
        </div>
        <SignInForm next={safeNext} />
        <p className="mt-4 text-center text-sm">
          <Link to={paths.resetRequest.href()}>Forgot your password?</Link>
        </p>
      </div>
    </main>
  );
}
