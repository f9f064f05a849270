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
export function parseField<T>(id: string, parse: (text: string) => T, text = $<HTMLInputElement>(id).value): T | null {
  try {
    const value = parse(text);
    fieldError(id, "");
    return value;
  } catch (e) {
    fieldError(id, (e as Error).message);
    return null;
  }
}

/** The fields of a form that decide its results, as one string (fields marked data-no-result left out). */
export function inputsOf(form: string): string {
  const fields = $(form).querySelectorAll<HTMLInputElement | HTMLSelectElement>(
    "input:not([data-no-result]), select:not([data-no-result])",
  );
  return JSON.stringify([...fields].map((f) => (f instanceof HTMLInputElement && f.type === "checkbox" ? f.checked : f.value.trim())));
}

const CHANGED = "the inputs above have changed since: run again for theirs";
const panels = new Map<string, ResultsPanel>();

/** The results panel of a form, if it has one. */
export const panelOf = (form: string) => panels.get(form);

/**
 * A view's results and the note above them: current after `shown`, dimmed with the note's reason
 * after `markStale` (a new run in progress, a cancel, inputs that are not valid), and while the
 * form's inputs differ from those that produced them (`follow`, on every input).
 * @example const panel = new ResultsPanel("cycles-results", "cycles-stale", "cycles-form"); panel.shown("3x+5, period 24");
 */
export class ResultsPanel {
  private reason: string | null = null;

  constructor(
    private readonly results: string,
    private readonly note: string,
    private readonly form: string,
  ) {
    panels.set(form, this);
  }

  /** The results on screen are now those of `params` (a few words: map, depth, ...) and the form's inputs. */
  shown(params: string): void {
    const results = $(this.results);
    results.hidden = false;
    results.dataset.params = params;
    results.dataset.inputs = inputsOf(this.form);
    results.classList.remove("stale");
    $(this.note).hidden = true;
    this.reason = null;
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
    this.reason = why;
  }

  /** Whether results are on screen, not dimmed, and made from the inputs the form now holds. */
  current(): boolean {
    const results = $(this.results);
    return !!results.dataset.params && this.reason === null && results.dataset.inputs === inputsOf(this.form);
  }

  /** After an input: dimmed while the inputs differ from the shown results' own, current again when they match. */
  follow(): void {
    const results = $(this.results);
    if (!results.dataset.params || (this.reason !== null && this.reason !== CHANGED)) return;
    if (inputsOf(this.form) !== results.dataset.inputs) this.markStale(CHANGED);
    else if (this.reason === CHANGED) {
      results.classList.remove("stale");
      $(this.note).hidden = true;
      this.reason = null;
    }
  }
}
