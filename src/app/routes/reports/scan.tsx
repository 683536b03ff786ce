import { Link, useNavigate } from "react-router";
import { paths } from "../../../config/paths";
import { TagScanner } from "../../../features/reports/components/tag-scanner";

/** A phone's "Scan a tag": read a tag's QR code (or type it) and open its position. */
export default function ScanPage() {
  const navigate = useNavigate();
  return (
    <main id="main" className="mx-auto max-w-xl space-y-4 p-4">
      <h1 className="text-2xl font-bold">Scan a tag</h1>
      <p className="text-mist">Point the camera at the code on a part's tag or bag. The position it came from opens.</p>
      <TagScanner onTag={(tag) => navigate(paths.tag.href(tag))} />
      <Link to={paths.sites.href()} className="inline-flex min-h-11 items-center underline">
        Back to your sites
      </Link>
    </main>
  );
}
