import { useId } from "react";
import { cn } from "@/lib/cn";

export type SafetyTopic = "cryogens" | "magnetic-field";

const CAUTIONS: Record<SafetyTopic, { title: string; points: string[] }> = {
  cryogens: {
    title: "Liquid helium and liquid nitrogen",
    points: [
      "Boiling cryogen pushes the air out of a room. In a small or closed space there can be too little oxygen to breathe, and you will not notice it coming. Work where the room is ventilated and an oxygen monitor runs if your rules call for one.",
      "The liquid, the cold gas and frosted metal burn skin and eyes. Wear a face shield and loose insulated gloves when you transfer or handle cold parts.",
      "Cryogen trapped in a closed volume builds pressure as it warms. Never seal a dewar, a line or a sample holder that holds liquid; keep relief valves clear.",
    ],
  },
  "magnetic-field": {
    title: "High magnetic fields",
    points: [
      "People with pacemakers, defibrillators or other active implants stay outside the marked field line.",
      "Iron and steel objects (tools, gas cylinders, chairs, keys) can be pulled into the magnet hard enough to injure. Keep them out of the field area.",
      "A superconducting magnet can quench: its stored energy boils off the helium at once as a cold cloud. Leave the room and let it ventilate before you go back.",
    ],
  },
};

/** The usual cautions for cryogens and high fields, for placing beside instrument settings. */
export function SafetyNote({ topics = ["cryogens", "magnetic-field"], className }: { topics?: readonly SafetyTopic[]; className?: string }) {
  const headingId = useId();
  return (
    <aside aria-labelledby={headingId} className={cn("rounded-lg border border-caution/40 bg-caution-soft px-4 py-3 text-sm text-ink", className)}>
      <h2 id={headingId} className="mb-2 flex items-center gap-2 font-semibold">
        <svg aria-hidden="true" viewBox="0 0 20 20" className="size-4 text-caution" fill="currentColor">
          <path d="M10 1.5 19 17.5H1L10 1.5Zm-.9 6v5h1.8v-5H9.1Zm0 6.3v1.8h1.8v-1.8H9.1Z" />
        </svg>
        Cautions
      </h2>
      <div className="space-y-3">
        {topics.map((topic) => (
          <div key={topic}>
            <h3 className="font-medium">{CAUTIONS[topic].title}</h3>
            <ul className="mt-1 list-disc space-y-1 pl-5">
              {CAUTIONS[topic].points.map((point) => (
                <li key={point}>{point}</li>
              ))}
            </ul>
          </div>
        ))}
      </div>
      <p className="mt-3 border-t border-caution/30 pt-2 text-xs">
        These are general cautions, not a safety procedure. Your institution's rules and your lab's safety officer come
        first: follow their training and instructions.
      </p>
    </aside>
  );
}

/** The one-line reminder of what Thetafold's numbers are for. */
export function ResearchDataNotice({ className }: { className?: string }) {
  return (
    <p role="note" className={cn("text-xs text-ink-muted", className)}>
      Research data, not certified property data for engineering design.
    </p>
  );
}
