import { useId, type JSX } from "react";
import { SYSTEM_NAMES, type ColourSystemId, type HouseStyleId } from "~/domain/colours";
import type { CardDiff, RowChange } from "~/domain/submissions";
import { FacePanel } from "./face-panel";
import { CELL, Mark, TABLE, cx, orDash, plural, type Notation } from "./marks";
import { PhotoGroup } from "./photo-group";
import { PinTable } from "./pin-table";
import { SpecTable } from "./spec-table";

/**
 * What a submission changes against the published card, laid out for a moderator: published on the left, proposed on
 * the right. Every marking is a symbol and a word as well as a tint, so it reads on a phone, to a screen reader and in a
 * black-and-white print. Only `notesHtml` (already sanitised on the server) is inserted as HTML; everything else is text.
 */

const FIELD_LABELS: Readonly<Record<CardDiff["fields"][number]["field"], string>> = Object.freeze({
  name: "Name",
  location: "Where it sits",
  housing: "Housing",
  gender: "Plug or socket",
  system: "System",
  matesWith: "Mates with",
});

function NotesBox({ label, html }: { label: string; html: string }) {
  return (
    <div className="min-w-0 rounded-md border border-rule bg-white p-3" data-notes={label.toLowerCase()}>
      <h4 className="font-semibold">{label}</h4>
      {html ? (
        <div className="prose prose-sm mt-1 max-w-none print:text-[8.5pt] print:leading-snug" dangerouslySetInnerHTML={{ __html: html }} />
      ) : (
        <p className="mt-1 text-muted">No notes.</p>
      )}
    </div>
  );
}

/** The comparison a moderator reads before deciding: card fields, face views, pin map, specs, notes and photos. */
export function CardDiffView(props: {
  diff: CardDiff;
  colourSystem: ColourSystemId;
  /** The make's house style within that notation (null: the notation's usual reading). */
  houseStyle?: HouseStyleId | null;
  photoUrl: (id: string, thumb: boolean) => string;
  notesHtml: { before: string; after: string };
}): JSX.Element {
  const { diff, colourSystem, houseStyle = null, photoUrl, notesHtml } = props;
  const notation: Notation = { system: colourSystem, houseStyle };
  const uid = "cd" + useId().replace(/[^A-Za-z0-9_-]/g, "");
  const idFor = (cavity: string) => `${uid}-pin-${cavity}`;
  const isNew = diff.layout.before === null;

  if (!diff.any) {
    return (
      <section aria-labelledby={`${uid}-h`} className="rounded-md border border-rule bg-white p-4" data-diff="none">
        <h2 id={`${uid}-h`} className="text-xl font-bold">
          What this proposal changes
        </h2>
        <p className="mt-1 font-semibold" data-nothing-changed="true">
          <span aria-hidden="true">= </span>This proposal changes nothing: it matches the published card as it stands.
        </p>
      </section>
    );
  }

  const moved = diff.pins.filter((r) => r.change !== "same");
  const same = diff.pins.filter((r) => r.change === "same");
  const count = (c: RowChange) => diff.pins.filter((r) => r.change === c).length;
  const beforePins = diff.pins.flatMap((r) => (r.before ? [r.before] : []));
  const afterPins = diff.pins.flatMap((r) => (r.after ? [r.after] : []));
  const beforeMarks = new Map<string, Exclude<RowChange, "same">>();
  const afterMarks = new Map<string, Exclude<RowChange, "same">>();
  // Every row that moves is ringed on each face whose housing has that cavity: a new row on the published face marks a
  // cavity that was empty, a row taken out on the proposed face one that is left empty.
  for (const r of diff.pins) {
    if (r.change === "same") continue;
    beforeMarks.set(r.cavity, r.change);
    afterMarks.set(r.cavity, r.change);
  }
  const nameAfter = diff.fields.find((f) => f.field === "name")?.after;
  const nameBefore = diff.fields.find((f) => f.field === "name")?.before;
  const cardName = (nameAfter ?? "").trim();
  const specsMoved = diff.specs.filter((s) => s.change !== "same");
  const specsSame = diff.specs.filter((s) => s.change === "same");

  const rowWords: Record<Exclude<RowChange, "same">, (n: number) => string> = {
    added: (n) => plural(n, "new row", "new rows"),
    removed: (n) => `${plural(n, "row", "rows")} taken out`,
    changed: (n) => `${n} changed`,
  };
  const summary: string[] = [];
  if (!isNew && diff.fields.length) summary.push(plural(diff.fields.length, "card detail", "card details"));
  if (!isNew && diff.layout.changed) summary.push("the housing layout");
  if (moved.length) {
    const parts = (["added", "removed", "changed"] as const).filter((c) => count(c) > 0).map((c) => rowWords[c](count(c)));
    summary.push(isNew ? plural(moved.length, "pin-map row", "pin-map rows") : `${plural(moved.length, "pin-map row", "pin-map rows")} (${parts.join(", ")})`);
  }
  if (specsMoved.length) summary.push(plural(specsMoved.length, "spec", "specs"));
  if (diff.notes.changed && !isNew) summary.push("the notes");
  if (diff.photos.added.length)
    summary.push(isNew ? plural(diff.photos.added.length, "photo", "photos") : plural(diff.photos.added.length, "new photo", "new photos"));
  if (diff.photos.removed.length) summary.push(`${plural(diff.photos.removed.length, "photo", "photos")} taken out`);

  return (
    <section aria-labelledby={`${uid}-h`} className="space-y-5 print:space-y-3" data-diff={isNew ? "new-card" : "changes"}>
      <header>
        <h2 id={`${uid}-h`} className="text-xl font-bold print:text-base">
          What this proposal changes
        </h2>
        <p className="mt-1" data-summary="true">
          {isNew
            ? `A new card: there is no published version to compare with, so everything below is proposed${summary.length ? ` (${summary.join("; ")})` : ""}.`
            : `Against the published card it changes: ${summary.join("; ")}.`}
        </p>
        <p className="mt-1 text-sm text-muted print:text-[8pt]">
          Markings: <Mark change="added" />, <Mark change="removed" />, <Mark change="changed" /> (the proposed value in bold, the published one after “was”),{" "}
          <Mark change="same" />.
        </p>
      </header>

      {diff.fields.length > 0 ? (
        <section aria-labelledby={`${uid}-fields`}>
          <h3 id={`${uid}-fields`} className="text-lg font-bold print:text-sm">
            Card details
          </h3>
          <div className="overflow-x-auto">
            <table className={`${TABLE} max-w-3xl`}>
              <caption className="sr-only">{isNew ? "Card details proposed for the new card" : "Card details: published and proposed"}</caption>
              <thead className="border-b-2 border-ink">
                <tr>
                  <th scope="col" className={CELL}>
                    Detail
                  </th>
                  {isNew ? null : (
                    <th scope="col" className={CELL}>
                      Published (was)
                    </th>
                  )}
                  <th scope="col" className={CELL}>
                    Proposed
                  </th>
                </tr>
              </thead>
              <tbody>
                {diff.fields.map((f) => (
                  <tr key={f.field} data-field={f.field} className="border-b border-rule align-top">
                    <th scope="row" className={`${CELL} font-semibold`}>
                      {FIELD_LABELS[f.field]}
                    </th>
                    {isNew ? null : (
                      <td className={`${CELL} text-muted`}>{f.before === null ? "none" : <del className="decoration-2">{orDash(f.before)}</del>}</td>
                    )}
                    <td className={`${CELL} font-bold`}>{f.after === null ? "none" : <ins className="no-underline">{orDash(f.after)}</ins>}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}

      <section aria-labelledby={`${uid}-faces`}>
        <h3 id={`${uid}-faces`} className="text-lg font-bold print:text-sm">
          Face view
        </h3>
        <p className="text-sm print:text-[8pt]">
          Mating face, as the pin map colours it. Pin 1 is marked ▼. Cavities whose rows change are ringed, with the row&apos;s symbol beside them.
          {!isNew ? (diff.layout.changed ? " The housing layout changes." : " The housing layout stays the same.") : null}
        </p>
        <div className={cx("mt-2 grid gap-4", isNew ? "max-w-md" : "sm:grid-cols-2 print:grid-cols-2")}>
          {!isNew && diff.layout.before ? (
            <FacePanel
              label="Published"
              cardName={(nameBefore ?? cardName) || ""}
              layout={diff.layout.before}
              pins={beforePins}
              notation={notation}
              marks={beforeMarks}
              idFor={idFor}
            />
          ) : null}
          <FacePanel label="Proposed" cardName={cardName} layout={diff.layout.after} pins={afterPins} notation={notation} marks={afterMarks} idFor={idFor} />
        </div>
      </section>

      <section aria-labelledby={`${uid}-pins`} className="min-w-0">
        <h3 id={`${uid}-pins`} className="text-lg font-bold print:text-sm">
          Pin map
        </h3>
        {moved.length > 0 ? (
          <PinTable
            rows={moved}
            notation={notation}
            idFor={idFor}
            caption={isNew ? "Pin map rows of the new card" : "Pin map rows this proposal changes, with the published value after “was”"}
          />
        ) : (
          <p className="mt-1" data-pins-unchanged="true">
            No pin-map row changes.
          </p>
        )}
        {same.length > 0 ? (
          <details className="mt-2" data-unchanged-rows={same.length}>
            <summary className="cursor-pointer font-semibold underline">{plural(same.length, "unchanged row", "unchanged rows")}: show</summary>
            <PinTable rows={same} notation={notation} idFor={idFor} caption="Pin map rows this proposal leaves as they are" />
          </details>
        ) : null}
        <p className="mt-1 text-xs text-muted">Codes in {SYSTEM_NAMES[colourSystem]}, base colour first.</p>
      </section>

      {diff.specs.length > 0 ? (
        <section aria-labelledby={`${uid}-specs`}>
          <h3 id={`${uid}-specs`} className="text-lg font-bold print:text-sm">
            What it should read
          </h3>
          {specsMoved.length > 0 ? <SpecTable rows={specsMoved} caption="Spec values this proposal changes" /> : <p className="mt-1">No spec value changes.</p>}
          {specsSame.length > 0 ? (
            <details className="mt-2" data-unchanged-specs={specsSame.length}>
              <summary className="cursor-pointer font-semibold underline">{plural(specsSame.length, "unchanged spec", "unchanged specs")}: show</summary>
              <SpecTable rows={specsSame} caption="Spec values this proposal leaves as they are" />
            </details>
          ) : null}
        </section>
      ) : null}

      <section aria-labelledby={`${uid}-notes`}>
        <h3 id={`${uid}-notes`} className="text-lg font-bold print:text-sm">
          Notes
        </h3>
        {isNew ? (
          <div className="mt-2 max-w-3xl">
            <NotesBox label="Proposed" html={notesHtml.after} />
          </div>
        ) : diff.notes.changed ? (
          <div className="mt-2 grid gap-4 sm:grid-cols-2 print:grid-cols-2" data-notes-changed="true">
            <NotesBox label="Published" html={notesHtml.before} />
            <NotesBox label="Proposed" html={notesHtml.after} />
          </div>
        ) : (
          <p className="mt-1" data-notes-changed="false">
            The notes do not change.
          </p>
        )}
      </section>

      <section aria-labelledby={`${uid}-photos`}>
        <h3 id={`${uid}-photos`} className="text-lg font-bold print:text-sm">
          Photos
        </h3>
        {diff.photos.added.length + diff.photos.removed.length + diff.photos.kept.length === 0 ? (
          <p className="mt-1">No photos, before or after.</p>
        ) : (
          <>
            {diff.photos.added.length === 0 && diff.photos.removed.length === 0 ? <p className="mt-1">The photos do not change.</p> : null}
            <PhotoGroup title="New photos" change="added" photos={diff.photos.added} startAt={1} photoUrl={photoUrl} />
            <PhotoGroup title="Photos taken out" change="removed" photos={diff.photos.removed} startAt={1 + diff.photos.added.length} photoUrl={photoUrl} />
            <PhotoGroup
              title="Photos kept"
              change="kept"
              photos={diff.photos.kept}
              startAt={1 + diff.photos.added.length + diff.photos.removed.length}
              photoUrl={photoUrl}
            />
          </>
        )}
      </section>
    </section>
  );
}
