// What a submission changes against the published card. The parts live in ./card-diff/ (the view that composes them, the
// shared marks, the face panels, the pin and spec tables, the photo groups); pages and tests import it from here.
export { CardDiffView } from "./card-diff/view";
