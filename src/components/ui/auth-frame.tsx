import type { ReactNode } from "react";
import { DebyeCurveArt, Wordmark } from "./brand";
import { ResearchDataNotice } from "./safety-note";

/** The frame of the signed-out pages: a brand panel with the Debye curve beside a form card. */
export function AuthFrame({ title, description, children, footer }: { title: ReactNode; description?: ReactNode; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="grid min-h-dvh lg:grid-cols-[minmax(0,5fr)_minmax(0,6fr)]">
      <div className="relative hidden flex-col justify-between overflow-hidden border-r border-line bg-sunken p-10 lg:flex">
        <Wordmark className="text-lg" />
        <div className="space-y-6">
          <DebyeCurveArt className="max-w-md" />
          <p className="max-w-sm text-lg leading-snug text-ink">
            Heat capacity of solids, from the calorimeter's export to a fitted Debye temperature you can quote.
          </p>
        </div>
        <ResearchDataNotice />
        <div aria-hidden="true" className="absolute inset-x-0 top-0 h-1 bg-linear-to-r from-frost via-ember to-ember-strong" />
      </div>
      <main className="flex flex-col items-center justify-center px-4 py-10 sm:px-8">
        <div className="mb-8 lg:hidden">
          <Wordmark className="text-lg" />
        </div>
        <div className="w-full max-w-sm">
          <h1 tabIndex={-1} data-page-title className="text-2xl font-semibold tracking-tight text-ink focus:outline-none">
            {title}
          </h1>
          {description && <div className="mt-1.5 text-sm text-ink-muted">{description}</div>}
          <div className="mt-6">{children}</div>
          {footer && <div className="mt-6 border-t border-line pt-4 text-sm text-ink-muted">{footer}</div>}
        </div>
        <ResearchDataNotice className="mt-10 lg:hidden" />
      </main>
    </div>
  );
}
