import { Link } from "react-router-dom";
import { Wordmark } from "@/components/ui/brand";
import { NotFoundPanel } from "@/components/ui/not-found-panel";

export function Component() {
  return (
    <div className="min-h-dvh">
      <title>Not found · Thetafold</title>
      <header className="border-b border-line bg-surface px-4 py-3">
        <Link to="/" aria-label="Thetafold home" className="inline-block rounded-md">
          <Wordmark />
        </Link>
      </header>
      <main className="px-4">
        <NotFoundPanel />
      </main>
    </div>
  );
}
