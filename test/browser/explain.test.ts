// The mathematics where it is used: before any run each view says what it computes and what its
// result proves, a glossary is one click away from every view, and it says why the sieve is valid
// with its published sources.
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();
const VIEWS = ["run", "table", "inspect", "cycles", "verify", "tree"] as const;

/** Whether the element is on screen now (its box within the viewport). */
const onScreen = (page: Page, sel: string) =>
  page.$eval(sel, (e) => {
    const r = e.getBoundingClientRect();
    return r.height > 0 && r.top >= 0 && r.top < innerHeight;
  });

describe.skipIf(!hasChromium)("web app: each view explained, and a glossary", () => {
  it("before any run each view says in a few lines what it computes and what its result proves", async () => {
    const page = await open();
    // words each explanation must use: what the view computes, and what it proves or does not
    const words: Record<(typeof VIEWS)[number], RegExp[]> = {
      run: [/survive the sieve/, /coefficient/, /verification still has to iterate/],
      table: [/survivor/, /affine form/],
      inspect: [/trajectory/, /coefficient stopping time/, /proves facts about\s+this number or class only/],
      cycles: [/Every integer cycle/, /complete by construction/, /any cycle not in the table\s+is longer/],
      verify: [/every n in \[From, To\)/, /induction proves/, /given the numbers below From/],
      tree: [/reaches N/, /all the\s+predecessors of N within K steps/],
    };
    for (const view of VIEWS) {
      await page.click(`#tab-${view}`);
      const sel = `#${view}-explain`;
      expect(await page.isVisible(sel), view).toBe(true);
      const text = (await page.textContent(sel))!.replace(/\s+/g, " ");
      for (const w of words[view]) expect(text, view).toMatch(w);
      // two or three lines at 1366 px, not a page (line height 1.4 of 14 px)
      const lines = await page.$eval(sel, (e) => e.getBoundingClientRect().height / Number.parseFloat(getComputedStyle(e).lineHeight));
      expect(lines, view).toBeGreaterThanOrEqual(1.9);
      expect(lines, view).toBeLessThanOrEqual(4.1);
    }
    await page.close();
  });

  it("the glossary is one click from every view: it opens at the terms, the address takes its fragment with no history entry", async () => {
    const page = await open();
    for (const view of VIEWS) {
      await page.goto(page.url().split("#")[0]!); // a fresh page, the glossary closed
      await page.click(`#tab-${view}`);
      const [address, entries] = [page.url(), await page.evaluate(() => history.length)];
      expect(await page.getAttribute("#glossary", "open"), view).toBeNull();
      await page.click(`#${view}-explain a[href="#glossary"]`);
      expect(await page.getAttribute("#glossary", "open"), view).not.toBeNull();
      expect(await onScreen(page, "#glossary dl"), view).toBe(true);
      expect(await page.evaluate(() => document.activeElement?.id), view).toBe("glossary");
      expect(page.url(), view).toBe(`${address.split("#")[0]}#glossary`); // the fragment in place, for a reload
      expect(await page.evaluate(() => history.length), view).toBe(entries);
    }
    // a term used in a view's explanation opens the glossary at that term
    await page.goto(page.url().split("#")[0]!);
    await page.click("#tab-verify");
    await page.click('#verify-explain a[href="#g-induction"]');
    expect(await onScreen(page, "#g-induction")).toBe(true);
    expect(await page.evaluate(() => document.activeElement?.id)).toBe("g-induction");
    // a reload opens the glossary at the term again
    await page.reload();
    expect(await page.getAttribute("#glossary", "open")).not.toBeNull();
    expect(await onScreen(page, "#g-induction")).toBe(true);
    await page.close();
  });

  it("the glossary defines each term the views use, and says why the sieve is valid, naming its published sources", async () => {
    const page = await open();
    const terms = await page.$$eval("#glossary dt", (dts) => Object.fromEntries(dts.map((d) => [d.id, d.textContent!])));
    for (const [id, term] of [
      ["g-glide", /glide/],
      ["g-delay", /delay/],
      ["g-path", /path/],
      ["g-standard", /standard steps/],
      ["g-cst", /coefficient stopping time/],
      ["g-survivor", /survivor/],
      ["g-exception", /exception/],
      ["g-preimage", /preimage skip/],
      ["g-leaf", /leaf/],
      ["g-induction", /given the numbers below From/],
    ] as const)
      expect(terms[id], id).toMatch(term);
    const why = (await page.textContent("#glossary"))!.replace(/\s+/g, " ");
    expect(why).toContain("Why the sieve is valid");
    // the affine form of a class and the descent from its coefficient (Terras 1976; common practice)
    expect(why).toContain("Tj(a + 2jx) = qmx + b"); // T^j(a + 2^j x) = q^m x + b, as superscripts
    expect(why).toContain("Tj(n) − n = (qm − 2j)x + (b − a)");
    // the sources, from memory
    expect(why).toContain('R. Terras, "A stopping time problem on the positive integers", Acta Arithmetica 30 (1976) 241–252');
    expect(why).toContain("C. J. Everett");
    expect(why).toContain("Advances in Mathematics 25 (1977) 42–45");
    await page.close();
  });

  it("the glossary's affine form and descent bound hold for every class mod 2^10 of 3x+1 (BigInt brute force)", async () => {
    // not the page's code: the statement the glossary makes, checked directly on the map's definition
    const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 1n) / 2n);
    const j = 10;
    for (let a = 0n; a < 1n << BigInt(j); a++) {
      let [b, m] = [a, 0n];
      for (let i = 0; i < j; i++) {
        if (b % 2n === 1n) m++;
        b = T(b);
      }
      for (let x = 0n; x < 40n; x++) {
        const n = a + (1n << BigInt(j)) * x;
        let v = n;
        for (let i = 0; i < j; i++) v = T(v);
        expect(v).toBe(3n ** m * x + b); // T^j(a + 2^j x) = q^m x + b
        // below the start for every x > (b − a)/(2^j − q^m) when q^m < 2^j
        const room = (1n << BigInt(j)) - 3n ** m;
        if (room > 0n && x * room > b - a) expect(v < n).toBe(true);
      }
    }
  });
});
