import { data } from "react-router";

/** Any address nobody declared: the real 404 page (rendered by the root boundary). */
export function loader() {
  throw data("This page is not in the library.", { status: 404 });
}

export default function NotFound() {
  return null;
}
