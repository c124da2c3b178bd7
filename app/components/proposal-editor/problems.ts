import type { ColourSystemId, HouseStyleId } from "~/domain/colours";
import { proposalProblems, type CardProposal, type Problem } from "~/domain/submissions";
import { displayKey, isBlankSpec, type NumField } from "./fields";

function valueAt(p: CardProposal, path: string): unknown {
  let v: unknown = p;
  for (const k of path.split(".")) {
    if (v === null || typeof v !== "object") return undefined;
    v = (v as Record<string, unknown>)[k];
  }
  return v;
}

const sameValue = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/**
 * The problems the editor shows, by the place each is shown (see displayKey): the server's, and the live checks of the
 * draft. `specText` is what was typed into the spec number boxes (a typo there is not a number yet).
 */
export function editorProblems(args: {
  draft: CardProposal;
  proposal: CardProposal;
  problems: Problem[];
  colourSystem: ColourSystemId;
  houseStyle: HouseStyleId | null;
  cards: Map<string, string[]>;
  specText: Partial<Record<NumField, string>>[];
}) {
  const { draft, proposal, problems, colourSystem, houseStyle, cards, specText } = args;
  // Problems from the server stay next to their field until that field is changed; the domain's own checks of the
  // layout, cavities, terminals, "goes to" and spec pins run live on the draft as well.
  const fromServer = problems.filter((p) => sameValue(valueAt(draft, p.field), valueAt(proposal, p.field)));
  const live = proposalProblems(draft, colourSystem, cards, { houseStyle }).filter((p) => {
    const m = /^(?:layout|pins|pins\.(\d+)\.(cavity|terminal|goesTo)|specs\.(\d+)\.(between|min))$/.exec(p.field);
    if (!m) return false;
    if (m[3] !== undefined) {
      // An unfinished spec row gets the plain requests below, not "cavity “” is not in the layout".
      const s = draft.specs[Number(m[3])];
      if (isBlankSpec(s)) return false;
      return m[4] === "between" ? s.between.every((c) => c.trim() !== "") : Number.isFinite(s.min) && (s.max === null || Number.isFinite(s.max));
    }
    if (m[2] === "goesTo") {
      const g = draft.pins[Number(m[1])].goesTo;
      return Boolean(g?.connector && g.cavity);
    }
    return true;
  });
  draft.pins.forEach((pin, i) => {
    const g = pin.goesTo;
    if (g && g.connector && !g.cavity) live.push({ field: `pins.${i}.goesTo`, message: `Row ${i + 1}: choose the cavity at the other end too.` });
    if (g && !g.connector && g.cavity) live.push({ field: `pins.${i}.goesTo`, message: `Row ${i + 1}: choose the connector at the other end too.` });
  });
  draft.specs.forEach((s, i) => {
    let typo = false;
    for (const f of ["min", "max", "atC"] as const) {
      const t = specText[i]?.[f];
      if (t !== undefined && t.trim() !== "" && !Number.isFinite(Number(t))) {
        typo = true;
        live.push({ field: `specs.${i}.${f}`, message: `“${t}” is not a number${t.includes(",") ? " (write decimals with a point, e.g. 0.9)" : ""}.` });
      }
    }
    if (isBlankSpec(s)) return;
    if (!typo && !(Number.isFinite(s.min) && (s.max === null || Number.isFinite(s.max))))
      live.push({ field: `specs.${i}.min`, message: `Spec ${i + 1}: give the least and the greatest value.` });
    if (s.between.some((c) => c.trim() === "")) live.push({ field: `specs.${i}.between`, message: `Spec ${i + 1}: give both cavities to measure between.` });
  });
  const byField = new Map<string, string[]>();
  for (const p of [...fromServer, ...live]) {
    const at = displayKey(p.field);
    const list = byField.get(at) ?? [];
    if (!list.includes(p.message)) list.push(p.message);
    byField.set(at, list);
  }
  const problemsOf = (field: string) => byField.get(field) ?? [];
  const serverCodeProblem = (i: number) => fromServer.some((p) => displayKey(p.field) === `pins.${i}.code`);
  return { fromServer, problemsOf, serverCodeProblem };
}
