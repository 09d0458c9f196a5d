import Link from "next/link";
import { Wordmark } from "@/components/ui/logo";

export default function NotFound() {
  return (
    <div className="mx-auto flex min-h-screen max-w-md flex-col justify-center px-6">
      <div className="text-brand-deep">
        <Wordmark />
      </div>
      <h1 className="mt-6 text-2xl font-semibold">Page not found (404)</h1>
      <p className="mt-2 text-ink-soft">There is no page at this address. It may have moved, or the link is mistyped.</p>
      <Link href="/floor" className="mt-6 text-brand underline">
        Back to the Floor
      </Link>
    </div>
  );
}
