import { cn } from "@/lib/cn";

const BASE = "size-10 text-ember-ink";

/** A capsule with a sample pellet: the Samples page. */
export function SampleIcon({ className }: { className?: string }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 40 40" fill="none" className={cn(BASE, className)}>
      <rect x="6" y="14" width="28" height="12" rx="6" stroke="currentColor" strokeWidth="2" />
      <path d="M20 14v12" stroke="currentColor" strokeWidth="2" />
      <circle cx="13" cy="20" r="2.5" fill="var(--color-frost)" />
    </svg>
  );
}

/** Points with error bars: the Compare page. */
export function CompareIcon({ className }: { className?: string }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 40 40" fill="none" className={cn(BASE, className)}>
      <path d="M6 34h28M6 6v28" stroke="currentColor" strokeWidth="2" strokeLinecap="round" />
      <path d="M14 14v10M22 10v8M30 16v12" stroke="var(--color-frost)" strokeWidth="1.6" strokeLinecap="round" />
      <circle cx="14" cy="19" r="2.5" fill="currentColor" />
      <circle cx="22" cy="14" r="2.5" fill="currentColor" />
      <circle cx="30" cy="22" r="2.5" fill="currentColor" />
    </svg>
  );
}

/** A tied parcel: the Bundles page. */
export function BundleIcon({ className }: { className?: string }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 40 40" fill="none" className={cn(BASE, className)}>
      <path d="M6 13l14-7 14 7v14l-14 7-14-7V13z" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
      <path d="M6 13l14 7 14-7M20 20v14" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
      <path d="M13 9.5l14 7" stroke="var(--color-frost)" strokeWidth="2" />
    </svg>
  );
}

/** An envelope: the Outbox. */
export function MailIcon({ className }: { className?: string }) {
  return (
    <svg aria-hidden="true" viewBox="0 0 40 40" fill="none" className={cn(BASE, className)}>
      <rect x="5" y="10" width="30" height="20" rx="3" stroke="currentColor" strokeWidth="2" />
      <path d="M6 12l14 10 14-10" stroke="var(--color-frost)" strokeWidth="2" strokeLinejoin="round" />
    </svg>
  );
}
