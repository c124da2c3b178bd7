import { describe, expect, it } from "vitest";
import { splitSharedConditions } from "../../app/domain/specs";

// A printed card states a shared set-up once. Nothing of any row's conditions may be lost in the split:
// shared + rest must still say everything each row said (common practice for a test sheet: the set-up line
// heads the sheet, each line then names its own meter connection).
describe("splitSharedConditions", () => {
  const LEAD = "Ignition off and the unit unplugged";
  it("takes the common lead-in up to a clause break and keeps each row's own part", () => {
    const r = splitSharedConditions([`${LEAD}: ohmmeter into cavities 5 and 6.`, `${LEAD}: ohmmeter into cavities 7 and 8.`]);
    expect(r.shared).toBe(LEAD);
    expect(r.rest).toEqual(["Ohmmeter into cavities 5 and 6.", "Ohmmeter into cavities 7 and 8."]);
  });
  it("does not cut inside a word or a clause when the texts share only part of one", () => {
    // Common prefix "Ignition off, the p" has no clause break: nothing is shared.
    const r = splitSharedConditions(["Ignition off, the pickup plug out: meter on 1 and 2.", "Ignition off, the plug out: meter on 3 and 4."]);
    expect(r.shared).toBeNull();
    expect(r.rest[0]).toBe("Ignition off, the pickup plug out: meter on 1 and 2.");
  });
  it("shares nothing when one spec has no conditions, when there is one spec, or when a row would be left empty", () => {
    expect(splitSharedConditions([`${LEAD}: a.`, null]).shared).toBeNull();
    expect(splitSharedConditions([`${LEAD}: a.`]).shared).toBeNull();
    expect(splitSharedConditions([`${LEAD}: a.`, `${LEAD}: a.`]).shared).toBe(LEAD);
    expect(splitSharedConditions([`${LEAD}. `, `${LEAD}. `]).shared).toBeNull();
  });
  it("loses nothing: each row's text is its shared lead and its own part", () => {
    const texts = [`${LEAD}: meter on 1 and 3. Reads with the ignition off.`, `${LEAD}: meter on 1 and 4.`, `${LEAD}: highest range, 5 to the frame: open.`];
    const r = splitSharedConditions(texts);
    texts.forEach((t, i) => expect(`${r.shared}: ${r.rest[i].charAt(0).toLowerCase()}${r.rest[i].slice(1)}`).toBe(t));
  });
});
