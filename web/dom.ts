// Small DOM helpers shared by the views.

/** The element with this id (the page's markup is fixed, so every id used exists). */
export const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;

/** Hands `parts` over to the user as a file called `name`. */
export function download(name: string, parts: BlobPart[], type: string): void {
  const url = URL.createObjectURL(new Blob(parts, { type }));
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

/** Shows `text` beside the field `id` (empty: clears it); returns whether the field is valid. */
export function fieldError(id: string, text: string): boolean {
  $(`${id}-error`).textContent = text;
  $(id).setAttribute("aria-invalid", text ? "true" : "false");
  return text === "";
}
