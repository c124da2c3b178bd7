import { LIMITS, type CardProposal, type ProposedSpec } from "~/domain/submissions";
import { SPEC_KINDS, SPEC_KIND_LABELS, SPEC_MATERIALS, SPEC_MATERIAL_LABELS, specKindOf, type SpecMaterial } from "~/domain/specs";
import { BUTTON, LABEL, SMALL_BUTTON, editorFieldId, inputClass, numText, pointListId, type EditorKit, type Notice, type NumField } from "./fields";

/** What the card should read: one row per measurement, with its two points, its range and the conditions. */
export function SpecsTable(props: {
  kit: EditorKit;
  draft: CardProposal;
  specText: Partial<Record<NumField, string>>[];
  hydrated: boolean;
  setSpec: (i: number, patch: Partial<ProposedSpec>) => void;
  setSpecNumber: (i: number, f: NumField, text: string) => void;
  setOpen: (i: number, open: boolean) => void;
  setKind: (i: number, value: string) => void;
  afterRemove: (kind: "pins" | "specs", i: number) => (next: CardProposal) => string;
  notice: Notice;
}) {
  const {
    kit: { problemsOf, describedBy, problemText, run },
    draft,
    specText,
    hydrated,
    setSpec,
    setSpecNumber,
    setOpen,
    setKind,
    afterRemove,
    notice,
  } = props;
  return (
    <section id={editorFieldId("specs")} tabIndex={-1} aria-labelledby="ed-specs-heading" className="space-y-3">
      <h2 id="ed-specs-heading" className="text-xl font-bold">
        What it should read
      </h2>
      <p className="text-sm text-muted">
        Values a rider can check with a meter, with the two cavities to measure between and the conditions that make the reading possible (a coil primary
        measured through the loom with the ignition off floats and reads open: say “plug apart, across the coil&apos;s own terminals”). Leave a row empty to
        drop it.
      </p>
      {problemText("specs")}
      <p role="status" className="text-sm font-semibold">
        {notice?.where === "specs" ? notice.text : ""}
      </p>
      {draft.specs.length > 0 ? (
        <ol className="space-y-3" aria-label="Spec rows">
          {draft.specs.map((s, i) => {
            const at = `specs.${i}`;
            const spec = (f: "name" | "unit" | "source" | "conditions", label: string, max: number, cls = "", hint?: string) => (
              <div className={cls}>
                <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>
                  {label}
                </label>
                <input
                  id={editorFieldId(`${at}.${f}`)}
                  name={`${at}.${f}`}
                  value={s[f] ?? ""}
                  maxLength={max}
                  autoComplete="off"
                  onChange={(e) => setSpec(i, { [f]: e.target.value })}
                  aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined}
                  aria-describedby={describedBy(`${at}.${f}`, hint && `${editorFieldId(`${at}.${f}`)}-hint`)}
                  className={inputClass(problemsOf(`${at}.${f}`).length > 0)}
                />
                {hint ? (
                  <p id={`${editorFieldId(`${at}.${f}`)}-hint`} className="mt-1 text-sm text-muted">
                    {hint}
                  </p>
                ) : null}
                {problemText(`${at}.${f}`)}
              </div>
            );
            // With no upper limit the greatest-value box is switched off once hydrated; without JavaScript it stays
            // usable (the server cannot re-enable it) and the ticked box wins when the form is read.
            const open = s.max === null;
            const num = (f: NumField, label: string) => (
              <div>
                <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>
                  {label}
                </label>
                <input
                  id={editorFieldId(`${at}.${f}`)}
                  name={`${at}.${f}`}
                  inputMode="decimal"
                  autoComplete="off"
                  value={specText[i]?.[f] ?? numText(s[f])}
                  disabled={f === "max" && open && hydrated ? true : undefined}
                  onChange={(e) => setSpecNumber(i, f, e.target.value)}
                  aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined}
                  aria-describedby={describedBy(`${at}.${f}`)}
                  className={`${inputClass(problemsOf(`${at}.${f}`).length > 0)} font-mono`}
                />
                {f === "max" ? (
                  <label htmlFor={editorFieldId(`${at}.open`)} className="mt-1 flex items-center gap-1.5 text-sm">
                    <input
                      id={editorFieldId(`${at}.open`)}
                      type="checkbox"
                      name={`${at}.open`}
                      value="1"
                      checked={open}
                      onChange={(e) => setOpen(i, e.target.checked)}
                      className="h-4 w-4"
                    />
                    no upper limit (must read open)
                  </label>
                ) : null}
                {problemText(`${at}.${f}`)}
              </div>
            );
            const choice = (f: "kind" | "material", label: string, value: string, options: readonly (readonly [string, string])[]) => (
              <div className="sm:col-span-2 lg:col-span-2">
                <label htmlFor={editorFieldId(`${at}.${f}`)} className={LABEL}>
                  {label}
                </label>
                <select
                  id={editorFieldId(`${at}.${f}`)}
                  name={`${at}.${f}`}
                  value={value}
                  onChange={(e) => (f === "kind" ? setKind(i, e.target.value) : setSpec(i, { material: (e.target.value || null) as SpecMaterial | null }))}
                  aria-invalid={problemsOf(`${at}.${f}`).length ? true : undefined}
                  aria-describedby={describedBy(`${at}.${f}`)}
                  className={inputClass(problemsOf(`${at}.${f}`).length > 0)}
                >
                  {options.map(([v, words]) => (
                    <option key={v} value={v}>
                      {words}
                    </option>
                  ))}
                </select>
                {problemText(`${at}.${f}`)}
              </div>
            );
            const between = (k: 0 | 1, label: string) => {
              const name = `${at}.between${k === 0 ? "A" : "B"}`;
              return (
                <div>
                  <label htmlFor={editorFieldId(name)} className={LABEL}>
                    {label}
                  </label>
                  <input
                    id={editorFieldId(name)}
                    name={name}
                    value={s.between[k]}
                    maxLength={12}
                    list={pointListId}
                    autoComplete="off"
                    spellCheck={false}
                    onChange={(e) => setSpec(i, { between: (k === 0 ? [e.target.value, s.between[1]] : [s.between[0], e.target.value]) as [string, string] })}
                    aria-describedby={describedBy(`${at}.between`)}
                    className={`${inputClass(problemsOf(`${at}.between`).length > 0)} font-mono`}
                  />
                </div>
              );
            };
            return (
              <li key={i} className="rounded-md border border-rule bg-white p-3">
                <div role="group" aria-labelledby={`ed-specs-${i}-label`} className="grid grid-cols-1 gap-3 sm:grid-cols-4 lg:grid-cols-8">
                  <p id={`ed-specs-${i}-label`} className="text-sm font-bold sm:col-span-4 lg:col-span-8">
                    Spec {i + 1}
                  </p>
                  {spec("name", "Measurement", 80, "sm:col-span-2 lg:col-span-2")}
                  {between(0, "Between (cavity, earth, HT, cap)")}
                  {between(1, "and")}
                  {num("min", "Least")}
                  {num("max", "Greatest")}
                  {spec("unit", "Unit", 12)}
                  {num("atC", "At °C")}
                  {choice(
                    "kind",
                    "What it measures",
                    specKindOf(s.kind),
                    SPEC_KINDS.map((k) => [k, SPEC_KIND_LABELS[k]] as const),
                  )}
                  {choice("material", "Material (resistances)", s.material ?? "", [
                    ["", "not stated (the bench sheet reads the name)"],
                    ...SPEC_MATERIALS.map((m) => [m, SPEC_MATERIAL_LABELS[m]] as const),
                  ])}
                  {spec(
                    "conditions",
                    "Measured how (conditions)",
                    LIMITS.conditions,
                    "sm:col-span-4 lg:col-span-4",
                    "e.g. ignition off, plug apart, meter on the 2 kΩ range; or engine at 5000 rpm, headlamp on.",
                  )}
                  {spec("source", "Source (manual and page, or how measured)", 120, "sm:col-span-4 lg:col-span-8")}
                  {problemsOf(`${at}.between`).length ? <div className="sm:col-span-4 lg:col-span-8">{problemText(`${at}.between`)}</div> : null}
                </div>
                <div className="mt-3">
                  <button
                    id={`ed-specs-${i}-remove`}
                    type="submit"
                    name="intent"
                    value={`remove-spec:${i}`}
                    formNoValidate
                    onClick={run(`remove-spec:${i}`, afterRemove("specs", i))}
                    aria-label={`Remove spec ${i + 1}`}
                    className={SMALL_BUTTON}
                  >
                    Remove
                  </button>
                </div>
              </li>
            );
          })}
        </ol>
      ) : null}
      <button
        id="ed-add-spec"
        type="submit"
        name="intent"
        value="add-spec"
        formNoValidate
        disabled={draft.specs.length >= LIMITS.specs}
        onClick={run("add-spec", (next) => `ed-specs-${next.specs.length - 1}-name`)}
        className={BUTTON}
      >
        Add a spec
      </button>
    </section>
  );
}
