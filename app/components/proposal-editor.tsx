// The editable connector card. Its parts live in ./proposal-editor/ (one file each: the shell that holds the draft, the
// housing layout, the pin map, the paste box and the specs); pages and tests import it from here.
export { ProposalEditor, type ProposalEditorProps } from "./proposal-editor/editor";
export { editorFieldId, type FamilyCardOption } from "./proposal-editor/fields";
