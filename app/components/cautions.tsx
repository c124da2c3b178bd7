/** The usual workshop cautions, shown where the work can hurt someone. */
export type CautionKind = "battery" | "ignition" | "fuel";

const TEXT: Record<CautionKind, { title: string; body: string }> = {
  battery: {
    title: "Battery",
    body: "Disconnect the battery earth lead first and reconnect it last, so a spanner touching the frame cannot short the live post. A shorted battery can weld a tool and start a fire; keep sparks and flames away from it, and wear eye protection.",
  },
  ignition: {
    title: "Ignition",
    body: "Ignition secondaries reach tens of kilovolts. Switch the ignition off before connecting a meter or touching coils, caps or leads; never crank or run with a plug lead open or a plug out of its cap — earth the plug body firmly when spark-testing.",
  },
  fuel: {
    title: "Fuel",
    body: "Petrol vapour is invisible, heavier than air and ignites from a spark. Work in a ventilated space, keep the tank and lines closed, and disconnect the battery before working near them.",
  },
};

/** A compact caution panel; defers to the factory manual, local rules and a qualified mechanic. */
export function Cautions({ kinds, className = "" }: { kinds: CautionKind[]; className?: string }) {
  return (
    <aside aria-label="Safety cautions" className={`print-avoid-break rounded-md border-l-4 border-caution-edge bg-caution px-4 py-3 text-[0.95rem] ${className}`}>
      <p className="font-bold">⚠ Before you start</p>
      <ul className="mt-1 space-y-1">
        {kinds.map((k) => (
          <li key={k}><span className="font-semibold">{TEXT[k].title}:</span> {TEXT[k].body}</li>
        ))}
      </ul>
      <p className="mt-1 text-sm print:text-[8pt]">The factory service manual, your local road-worthiness rules and a qualified mechanic take precedence over anything shown here.</p>
    </aside>
  );
}
