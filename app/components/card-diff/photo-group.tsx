import type { ProposedPhoto } from "~/domain/submissions";
import { cx } from "./marks";

export function PhotoGroup(props: {
  title: string;
  change: "added" | "removed" | "kept";
  photos: ProposedPhoto[];
  startAt: number;
  photoUrl: (id: string, thumb: boolean) => string;
}) {
  const { title, change, photos, startAt, photoUrl } = props;
  if (photos.length === 0) return null;
  const mark =
    change === "added" ? { symbol: "+", word: "new photo" } : change === "removed" ? { symbol: "−", word: "photo taken out" } : { symbol: "=", word: "kept" };
  const tint = change === "added" ? "border-sky-700 border-solid" : change === "removed" ? "border-stone-500 border-dashed" : "border-rule border-solid";
  return (
    <div data-photos={change}>
      <h4 className="mt-3 font-semibold">
        {title} ({photos.length})
      </h4>
      <ul className="mt-1 grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4 print:grid-cols-4">
        {photos.map((ph, i) => {
          const alt = ph.caption.trim() || `Photo ${startAt + i}`;
          return (
            <li key={ph.id} className="print-avoid-break">
              <figure className={cx("rounded-md border-2 bg-white p-1.5", tint)} data-photo={ph.id} data-change={change}>
                <a href={photoUrl(ph.id, false)} className="block">
                  <img
                    src={photoUrl(ph.id, true)}
                    alt={alt}
                    loading="lazy"
                    className={cx("h-28 w-full object-cover", change === "removed" && "opacity-60 grayscale")}
                  />
                </a>
                <figcaption className="mt-1 text-sm">
                  <span className="block font-semibold">
                    <span aria-hidden="true">{mark.symbol} </span>
                    {mark.word}
                  </span>
                  {change === "removed" ? (
                    <del className="decoration-2">{ph.caption || `Photo ${startAt + i}`}</del>
                  ) : (
                    <span>{ph.caption || `Photo ${startAt + i}`}</span>
                  )}
                  {ph.credit ? <span className="block text-muted">Credit: {ph.credit}</span> : null}
                </figcaption>
              </figure>
            </li>
          );
        })}
      </ul>
    </div>
  );
}
