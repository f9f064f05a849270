// The glossary at the foot of every view: a link to it, or to one of its terms, opens it and brings
// the term into view with the focus on it, without a history entry (the address keeps the view's state).
import { $ } from "../dom.js";

/** Wires every link to the glossary (#glossary) and to its terms (#g-...), now and in views drawn later. */
export function setupGlossary(): void {
  document.addEventListener("click", (e) => {
    const link = (e.target as Element).closest?.('a[href="#glossary"], a[href^="#g-"]');
    const target = link ? document.getElementById(link.getAttribute("href")!.slice(1)) : null;
    if (!target) return;
    e.preventDefault();
    $<HTMLDetailsElement>("glossary").open = true;
    if (!target.hasAttribute("tabindex")) target.setAttribute("tabindex", "-1");
    target.focus({ preventScroll: true });
    target.scrollIntoView({ block: "start" });
  });
}
