import { Link } from "react-router";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg p-6">
      <h1 className="text-2xl font-bold">Nothing here</h1>
      <p className="mt-2 text-mist">
        That address does not match a page of Tideline. It may have moved, or the link was cut short.
      </p>
      <Link to="/" className="mt-4 inline-block">
        Go to the start page
      </Link>
    </main>
  );
}
