/** One published photo of a card (display size and thumbnail, both WebP). */
export interface CardPhoto {
  url: string;
  thumbUrl: string;
  thumbWidth: number;
  thumbHeight: number;
  caption: string;
  credit: string;
  licence: string;
}

/** The card's photos: thumbnails linking to the display size, each with its caption and credit. */
export function CardPhotos({ photos, cardName }: { photos: CardPhoto[]; cardName: string }) {
  return (
    <section aria-labelledby="photos-heading" className="print-avoid-break">
      <h2 id="photos-heading" className="text-xl font-bold print:text-base">
        Photos
      </h2>
      <ul className="mt-2 grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-4 print:grid-cols-4 print:gap-1" data-testid="card-photos">
        {photos.map((p, i) => (
          <li key={p.url}>
            <figure>
              <a href={p.url}>
                <img
                  src={p.thumbUrl}
                  width={p.thumbWidth}
                  height={p.thumbHeight}
                  alt={p.caption || `Photo ${i + 1} of ${cardName}`}
                  loading="lazy"
                  className="h-auto w-full rounded border border-rule bg-white"
                />
              </a>
              <figcaption className="mt-1 text-sm print:text-[7pt]">
                {p.caption}
                {p.credit ? (
                  <span className="block text-muted">
                    Photo: {p.credit} · {p.licence}
                  </span>
                ) : null}
              </figcaption>
            </figure>
          </li>
        ))}
      </ul>
    </section>
  );
}
