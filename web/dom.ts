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

/**
 * `parse` applied to field `id`'s text: the value, or null with the error beside the field (a value
 * clears the field's error).
 * @example const map = parseField("run-map", parseMap);
 */
export function parseField<T>(id: string, parse: (text: string) => T, text = ($(id) as HTMLInputElement).value): T | null {
  try {
    const value = parse(text);
    fieldError(id, "");
    return value;
  } catch (e) {
    fieldError(id, (e as Error).message);
    return null;
  }
}

/**
 * A view's results and the note above them: current after `shown`, dimmed with the note's reason
 * after `markStale` (a new run in progress, a cancel, inputs that are not valid).
 * @example const panel = new ResultsPanel("cycles-results", "cycles-stale"); panel.shown("3x+5, period 24");
 */
export class ResultsPanel {
  constructor(
    private readonly results: string,
    private readonly note: string,
  ) {}

  /** The results on screen are now those of `params` (a few words: map, depth, ...). */
  shown(params: string): void {
    const results = $(this.results);
    results.hidden = false;
    results.dataset.params = params;
    results.classList.remove("stale");
    $(this.note).hidden = true;
  }

  /** Dims the results on screen, if any, with a note saying why they are no longer current. */
  markStale(why: string): void {
    const results = $(this.results);
    const params = results.dataset.params;
    if (!params) return;
    results.classList.add("stale");
    const note = $(this.note);
    note.textContent = `Shown: the previous result (${params}); ${why}.`;
    note.hidden = false;
  }
}
