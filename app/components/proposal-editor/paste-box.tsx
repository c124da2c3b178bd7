import type { ChangeEvent, Dispatch, SetStateAction } from "react";
import { BUTTON, LABEL, inputClass, type EditorKit, type Notice } from "./fields";

/** Rows pasted from a spreadsheet or a CSV, read into the pin map by "Read the pasted rows". */
export function PasteBox(props: {
  run: EditorKit["run"];
  paste: string;
  setPaste: (text: string) => void;
  pasteMode: "replace" | "append";
  setPasteMode: Dispatch<SetStateAction<"replace" | "append">>;
  notice: Notice;
}) {
  const { run, paste, setPaste, pasteMode, setPasteMode, notice } = props;
  return (
    <div className="rounded-md border border-rule bg-white p-3">
      <h3 className="font-bold">
        <label htmlFor="ed-paste">Paste from a spreadsheet</label>
      </h3>
      <p id="ed-paste-hint" className="mt-1 text-sm text-muted">
        Copy the rows straight from a spreadsheet, or paste CSV. Columns: cavity, colour code, circuit, terminal — or start with a header row (cavity, colour,
        circuit, terminal, goes to connector, goes to cavity; a Loomlore CSV download works as it is).
      </p>
      <textarea
        id="ed-paste"
        name="paste"
        rows={4}
        value={paste}
        onChange={(e: ChangeEvent<HTMLTextAreaElement>) => setPaste(e.target.value)}
        aria-describedby="ed-paste-hint"
        spellCheck={false}
        className={`${inputClass(false)} font-mono text-sm`}
      />
      <div className="mt-2 flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="ed-pasteMode" className={LABEL}>
            The pasted rows
          </label>
          <select
            id="ed-pasteMode"
            name="pasteMode"
            value={pasteMode}
            onChange={(e) => setPasteMode(e.target.value === "append" ? "append" : "replace")}
            className={`${inputClass(false)} w-auto`}
          >
            <option value="replace">replace the pin map</option>
            <option value="append">go after the rows above</option>
          </select>
        </div>
        <button type="submit" name="intent" value="paste" formNoValidate onClick={run("paste")} className={BUTTON}>
          Read the pasted rows
        </button>
      </div>
      <p role="status" className="mt-2 text-sm">
        {notice?.where === "paste" ? notice.text : ""}
      </p>
    </div>
  );
}
