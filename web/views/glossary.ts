// The glossary at the foot of every view: a link to it, or to one of its terms, opens it and brings
// the term into view with the focus on it. The address takes the term's fragment in place (a reload
// reopens it there) without a history entry, so Back still leaves the view in one press.
import { $ } from "../dom.js";

/** Opens the glossary at `id` (the glossary itself or one of its terms), the focus on it. */
function openAt(id: string): boolean {
  const target = document.getElementById(id);
  if (!target || (id !== "glossary" && !target.closest("#glossary"))) return false;
  $<HTMLDetailsElement>("glossary").open = true;
  if (!target.hasAttribute("tabindex")) target.setAttribute("tabindex", "-1");
  target.focus({ preventScroll: true });
  target.scrollIntoView({ block: "start" });
  return true;
}

/** Wires every link to the glossary (#glossary) and to its terms (#g-...), and opens it where the address points. */
export function setupGlossary(): void {
  document.addEventListener("click", (e) => {
    const link = (e.target as Element).closest?.('a[href="#glossary"], a[href^="#g-"]');
    const id = link?.getAttribute("href")?.slice(1);
    if (!id || !openAt(id)) return;
    e.preventDefault();
    history.replaceState(history.state, "", `${location.pathname}${location.search}#${id}`);
  });
  if (location.hash) openAt(decodeURIComponent(location.hash.slice(1)));
}
