import { NotFoundPanel } from "@/components/ui/not-found-panel";

/** An unknown address inside a lab: the header and navigation stay, so the way back is one click. */
export function Component() {
  return (
    <>
      <title>Not found · Thetafold</title>
      <NotFoundPanel />
    </>
  );
}
