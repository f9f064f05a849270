// Small DOM helpers shared by the views.

/** The element with this id (the page's markup is fixed, so every id used exists). */
export const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;

/** Shows `text` beside the field `id` (empty: clears it); returns whether the field is valid. */
export function fieldError(id: string, text: string): boolean {
  $(`${id}-error`).textContent = text;
  $(id).setAttribute("aria-invalid", text ? "true" : "false");
  return text === "";
}
