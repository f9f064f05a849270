// The page on a phone and from the keyboard: every table column within reach at 420 px, a select no
// wider than the screen, the tree's labels inside its drawing, taps near a node, one Tab stop for the
// tree with arrow keys inside it, its colours following the scheme, a touch screen's grid hint, chart
// labels that do not run together at depth 32, Verify's tables as wide as their content, the census
// before the residue grid, and the Inspector's powers.
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { summaryOf } from "./harness.js";
import { browserSuite, hasChromium } from "./suite.js";

const { open } = browserSuite();

/** T(n) of 3x+1: n/2 or (3n + 1)/2 (the map's definition). */
const T = (n: bigint) => (n % 2n === 0n ? n / 2n : (3n * n + 1n) / 2n);

/**
 * The cells of the page's visible tables (and the class table's grid) that cannot be reached at this
 * width: a cell is reachable when it is shown and ends on screen, or inside a box that scrolls
 * sideways (overflow-x auto or scroll) and itself ends on screen.
 */
function unreachableCells(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const out: string[] = [];
    for (const cell of document.querySelectorAll<HTMLElement>("table td, table th, [role=gridcell], [role=columnheader]")) {
      const table = cell.closest<HTMLElement>("table, [role=grid]")!;
      if (table.offsetParent === null) continue; // the table is not shown (another view)
      const r = cell.getBoundingClientRect();
      if (getComputedStyle(cell).display === "none") {
        out.push(`${table.id}: ${cell.textContent} (hidden)`);
        continue;
      }
      if (r.right <= width + 0.5) continue;
      // out through each box that scrolls sideways: within its scroll width, until one ends on screen
      let right = r.right;
      let reached = false;
      for (let box = cell.parentElement; box && !reached; box = box.parentElement) {
        if (!["auto", "scroll"].includes(getComputedStyle(box).overflowX)) continue;
        const b = box.getBoundingClientRect();
        if (right - b.left - box.clientLeft > box.scrollWidth + 0.5) break;
        reached = b.right <= width + 0.5;
        right = b.right;
      }
      if (!reached) out.push(`${table.id}: ${cell.textContent}`);
    }
    return out;
  });
}

/** The x-axis labels drawn on the canvas of chart `id`, in canvas pixels (recorded by the init script below). */
async function axisLabels(page: Page, id: string): Promise<{ text: string; left: number; right: number }[]> {
  return page.evaluate((id) => {
    const drawn = (window as unknown as { drawnText: { chart: string; text: string; left: number; right: number; y: number }[] }).drawnText;
    const mine = drawn.filter((d) => d.chart === id && /^\d+$/.test(d.text));
    const bottom = Math.max(...mine.map((d) => d.y)); // the x axis's labels are the lowest numbers drawn
    return mine.filter((d) => Math.abs(d.y - bottom) < 1).sort((a, b) => a.left - b.left);
  }, id);
}

/** Records every fillText on a chart's canvas, with its box along the line (text alignment applied). */
function recordCanvasText(): void {
  const w = window as unknown as { drawnText: unknown[] };
  w.drawnText = [];
  const fill = CanvasRenderingContext2D.prototype.fillText;
  CanvasRenderingContext2D.prototype.fillText = function (text: string, x: number, y: number, max?: number) {
    const chart = this.canvas.closest(".chart")?.id ?? "";
    const t = this.getTransform();
    const width = this.measureText(text).width * t.a;
    const at = t.a * x + t.e;
    const left = this.textAlign === "center" ? at - width / 2 : this.textAlign === "right" || this.textAlign === "end" ? at - width : at;
    w.drawnText.push({ chart, text: String(text), left, right: left + width, y: t.d * y + t.f });
    return max === undefined ? fill.call(this, text, x, y) : fill.call(this, text, x, y, max);
  };
}

describe.skipIf(!hasChromium)("web app: phone, keyboard, schemes and layout", () => {
  it("at 420 px every column of every table can be reached, the cycles' elements fit the screen, the Method select fits", async () => {
    const page = await open("?view=run&map=3x%2B1&depth=24&mode=survivors&run=1");
    await page.setViewportSize({ width: 420, height: 900 });
    await summaryOf(page);
    // the By-depth table with OEIS A076227 and agrees (3x+1)
    expect(await page.locator("#run-levels th", { hasText: "agrees" }).count()).toBe(1);
    expect(await unreachableCells(page)).toEqual([]);
    // the class table of the same run: its parity words and affine forms too
    await page.click("#tab-table");
    await page.waitForSelector(".vlist-row");
    expect(await unreachableCells(page)).toEqual([]);
    // cycles of 5x+1: the elements column on screen, not only within reach
    await page.click("#tab-cycles");
    await page.fill("#cycles-map", "5x+1");
    await page.fill("#cycles-period", "20");
    await page.click("#cycles-go");
    await page.waitForSelector("#cycles-table td.elements");
    expect(await unreachableCells(page)).toEqual([]);
    const right = await page.$$eval("#cycles-table td.elements", (cells) => Math.max(...cells.map((c) => c.getBoundingClientRect().right)));
    expect(right).toBeLessThanOrEqual(420);
    // Verify: the Method select within the screen and wide enough for its own text
    await page.click("#tab-verify");
    await page.fill("#verify-from", "1");
    await page.fill("#verify-to", "2^16");
    await page.click("#verify-go");
    await summaryOf(page);
    expect(await unreachableCells(page)).toEqual([]);
    const select = await page.$eval("#verify-method", (s) => {
      const sel = s as HTMLSelectElement;
      const ctx = document.createElement("canvas").getContext("2d")!;
      ctx.font = getComputedStyle(sel).font;
      const text = ctx.measureText(sel.options[sel.selectedIndex]!.text).width;
      const style = getComputedStyle(sel);
      // the room for the text: the box less its padding and the arrow (about 20 px)
      const room = sel.clientWidth - Number.parseFloat(style.paddingLeft) - Number.parseFloat(style.paddingRight) - 20;
      return { right: sel.getBoundingClientRect().right, room, text };
    });
    expect(select.right).toBeLessThanOrEqual(420);
    expect(select.text).toBeLessThanOrEqual(select.room);
    // the tree's level table (eight columns) scrolls inside its box
    await page.click("#tab-tree");
    await page.fill("#tree-depth", "24");
    await page.click("#tree-go");
    await page.waitForSelector("#tree-levels tbody tr");
    expect(await unreachableCells(page)).toEqual([]);
    await page.close();
  });

  it("the tree at 420 px: every label inside the drawing, none over another, 512 and 1024 among them; a tap 9 px from a node opens it", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=20&run=1");
    await page.setViewportSize({ width: 420, height: 900 });
    await page.click("#tree-go");
    await page.waitForFunction(() => document.querySelector("#tree-results:not(.stale) #tree-drawing text") !== null);
    const { labels, box } = await page.evaluate(() => {
      const svg = document.getElementById("tree-drawing")!.getBoundingClientRect();
      const labels = [...document.querySelectorAll("#tree-drawing text")].map((t) => {
        const r = t.getBoundingClientRect();
        return { text: t.textContent!, left: r.left, right: r.right, top: r.top, bottom: r.bottom };
      });
      return { labels, box: { left: svg.left, right: svg.right, top: svg.top, bottom: svg.bottom } };
    });
    expect(labels.map((l) => l.text)).toEqual(expect.arrayContaining(["512", "1024"]));
    for (const l of labels) {
      expect(l.left, l.text).toBeGreaterThanOrEqual(box.left);
      expect(l.right, l.text).toBeLessThanOrEqual(box.right);
    }
    for (const a of labels)
      for (const b of labels)
        if (a !== b)
          expect(a.right <= b.left || b.right <= a.left || a.bottom <= b.top || b.bottom <= a.top, `${a.text} over ${b.text}`).toBe(true);
    // node 5 (depth 4): a tap beside it, off the circle, opens it
    const five = await page.$eval('#tree-drawing circle[data-n="5"]', (c) => {
      c.scrollIntoView({ block: "center" });
      const r = c.getBoundingClientRect();
      return { x: (r.left + r.right) / 2, y: (r.top + r.bottom) / 2, size: r.width };
    });
    expect(five.size).toBeLessThan(9); // the circle itself is small: the tap lands off it
    await page.mouse.click(five.x, five.y + 9);
    expect(await page.getAttribute("#tab-inspect", "aria-selected")).toBe("true");
    expect(await page.inputValue("#inspect-input")).toBe("5");
    // a shallow tree leaves no empty box below its last row
    await page.click("#tab-tree");
    await page.fill("#tree-depth", "6");
    await page.click("#tree-go");
    // depths 0 to 6: 1, 1, 1, 1, 2, 3, 4 nodes (OEIS A060322), 13 in all
    await page.waitForFunction(() => document.querySelectorAll("#tree-drawing circle[data-n]").length === 13);
    const below = await page.$eval("#tree-drawing", (svg) => {
      const bottom = Math.max(...[...svg.querySelectorAll("circle[data-n]")].map((c) => c.getBoundingClientRect().bottom));
      return svg.getBoundingClientRect().bottom - bottom;
    });
    expect(below).toBeLessThan(40);
    await page.close();
  });

  it("the tree is one Tab stop; arrow keys move along a row and up and down the tree; Enter opens the node", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=12&run=1");
    await page.waitForSelector('#tree-drawing circle[data-n="1"]');
    expect(await page.locator("#tree-drawing [tabindex='0']").count()).toBe(1);
    // Tab from the last tool before the drawing reaches the drawing; the next Tab leaves it
    await page.focus("#tree-zoom-reset");
    await page.keyboard.press("Tab");
    const focused = () => page.evaluate(() => document.activeElement?.getAttribute("data-n") ?? null);
    expect(await focused()).toBe("1");
    await page.keyboard.press("Tab");
    expect(await focused()).toBeNull();
    await page.keyboard.press("Shift+Tab");
    expect(await focused()).toBe("1");
    // down from 1: 2, 4, 8 (their only preimages under T of 3x+1: common practice), then a child of 8
    for (const n of ["2", "4", "8"]) {
      await page.keyboard.press("ArrowDown");
      expect(await focused()).toBe(n);
    }
    await page.keyboard.press("ArrowDown");
    const child = BigInt((await focused())!);
    expect(T(child)).toBe(8n);
    // along the row: the next node to the right, at the same depth
    const place = (n: string) =>
      page.$eval(`#tree-drawing circle[data-n="${n}"]`, (c) => [Number(c.getAttribute("cx")), Number(c.getAttribute("cy"))]);
    const [x0, y0] = await place(String(child));
    await page.keyboard.press(x0! < 500 ? "ArrowRight" : "ArrowLeft");
    const beside = (await focused())!;
    const [x1, y1] = await place(beside);
    expect(y1).toBe(y0);
    expect(x1).not.toBe(x0);
    expect(T(BigInt(beside))).toBe(8n); // 8's two preimages, 5 and 16, are the whole row at depth 4
    await page.keyboard.press("ArrowUp");
    expect(await focused()).toBe("8");
    expect(await page.locator("#tree-drawing [tabindex='0']").count()).toBe(1);
    expect(await page.getAttribute('#tree-drawing circle[data-n="8"]', "tabindex")).toBe("0");
    await page.keyboard.press("Enter");
    expect(await page.getAttribute("#tab-inspect", "aria-selected")).toBe("true");
    expect(await page.inputValue("#inspect-input")).toBe("8");
    await page.close();
  });

  it("the tree's colours follow a change of colour scheme after it is drawn", async () => {
    const page = await open("?view=tree&tn=1&tmap=3x%2B1&tdepth=10&run=1");
    await page.waitForSelector('#tree-drawing circle[data-n="5"]');
    const fills = () =>
      page.$$eval("#tree-drawing circle[data-n]", (cs) =>
        cs.slice(0, 12).map((c) => `${c.getAttribute("data-n")}:${getComputedStyle(c).fill}`),
      );
    await page.emulateMedia({ colorScheme: "light" });
    const light = await fills();
    await page.emulateMedia({ colorScheme: "dark" });
    const dark = await fills();
    // 5 = 2 mod 3: Okabe-Ito bluish green #009E73, in the dark scheme the lighter #3FCF9F (the page's palette)
    expect(light).toContain("5:rgb(0, 158, 115)");
    expect(dark).toContain("5:rgb(63, 207, 159)");
    for (let i = 0; i < light.length; i++) expect(dark[i]).not.toBe(light[i]);
    await page.close();
  });

  it("on a touch screen the residue grid says tap, and a tapped cell is named", async () => {
    const page = await open("?view=run&map=3x%2B1&depth=12&mode=survivors&run=1");
    const cdp = await page.context().newCDPSession(page);
    await cdp.send("Emulation.setTouchEmulationEnabled", { enabled: true, maxTouchPoints: 1 });
    await summaryOf(page);
    expect(await page.evaluate(() => matchMedia("(hover: none)").matches)).toBe(true);
    expect(await page.isVisible("#view-run .pointer-coarse")).toBe(true);
    expect(await page.isVisible("#view-run .pointer-fine")).toBe(false);
    expect(await page.textContent("#view-run .pointer-coarse")).toMatch(/^Tap a cell/);
    // cell 27 of the 2^10 cells: 27 mod 2^10 survives to depth 10 (its coefficient 3^m/2^j stays above 1: common practice)
    await page.click("#run-grid span:nth-child(28)");
    expect(await page.textContent("#grid-picked")).toBe("27 mod 2^10: survives to depth 10");
    await cdp.send("Emulation.setTouchEmulationEnabled", { enabled: false });
    await page.close();
  });

  it("at depth 32 the depth axis's labels do not run together (sieve and tree charts)", async () => {
    const page = await open();
    await page.addInitScript(recordCanvasText);
    for (const [query, chart] of [
      ["?view=run&map=3x%2B1&depth=32&mode=survivors&run=1", "chart-stopped"],
      ["?view=tree&tn=1&tmap=3x%2B1&tdepth=32&run=1", "chart-tree"],
    ] as const) {
      await page.setViewportSize({ width: 420, height: 900 });
      await page.goto(new URL(query, page.url()).href);
      await summaryOf(page);
      await page.waitForFunction(
        (id) => (window as unknown as { drawnText: { chart: string }[] }).drawnText.some((d) => d.chart === id),
        chart,
      );
      const labels = await axisLabels(page, chart);
      expect(labels.length, chart).toBeGreaterThan(3);
      const digit = (labels[0]!.right - labels[0]!.left) / labels[0]!.text.length;
      for (let i = 1; i < labels.length; i++)
        expect(labels[i]!.left - labels[i - 1]!.right, `${chart}: ${labels[i - 1]!.text} and ${labels[i]!.text}`).toBeGreaterThanOrEqual(
          2 * digit,
        );
    }
    await page.close();
  });

  it("Verify at 1400 px: the counts table as wide as its content, each record table under its heading; an empty list shows no box", async () => {
    const page = await open("?view=verify&vmap=3x%2B1&from=1&to=2%5E16&run=1");
    await page.setViewportSize({ width: 1400, height: 900 });
    await summaryOf(page);
    expect(await page.$eval("#verify-counts", (t) => t.getBoundingClientRect().width)).toBeLessThan(700);
    for (const [table, heading] of [
      ["verify-glide", "Glide records"],
      ["verify-path", "Path records"],
    ])
      expect(await page.$eval(`#${table}`, (t) => t.closest("section")?.querySelector("h3")?.textContent)).toBe(heading);
    // [1, 2) of 3x+1: n = 1 lies on the cycle of 1, so it has no glide and the range no glide record (common practice)
    await page.fill("#verify-to", "2");
    await page.click("#verify-go");
    await page.waitForFunction(() => document.querySelector("#verify-glide tbody")?.children.length === 0);
    expect(await page.isVisible("#verify-glide")).toBe(false);
    expect(await page.isVisible("#verify-glide-title")).toBe(false);
    expect(
      await page.$$eval(
        "#view-verify .scroll",
        (bs) => bs.filter((b) => (b as HTMLElement).offsetHeight > 0 && !b.querySelector("tbody tr")).length,
      ),
    ).toBe(0);
    await page.close();
  });

  it("the census's own results come before the residue grid", async () => {
    const page = await open("?view=run&map=3x%2B1&depth=14&mode=full&run=1");
    await summaryOf(page);
    await page.waitForSelector("#run-census p");
    const [census, grid] = await Promise.all(["#run-census", "#run-grid"].map((s) => page.$eval(s, (e) => e.getBoundingClientRect().top)));
    expect(census).toBeLessThan(grid!);
    await page.setViewportSize({ width: 420, height: 900 });
    const [c2, g2] = await Promise.all(["#run-census", "#run-grid"].map((s) => page.$eval(s, (e) => e.getBoundingClientRect().top)));
    expect(c2).toBeLessThan(g2!);
    await page.close();
  });

  it("the Inspector reads 2^999-1 as Verify and Tree do: its largest value and the step of it, against a BigInt brute force", async () => {
    const page = await open("?view=inspect");
    await page.fill("#inspect-input", "2^999-1");
    await page.click("#inspect-go");
    await page.waitForFunction(
      () =>
        document.getElementById("inspect-card")!.textContent!.includes("largest value") ||
        document.getElementById("inspect-input-error")!.textContent,
    );
    expect(await page.textContent("#inspect-input-error")).toBe("");
    const card = (await page.textContent("#inspect-card"))!;
    const n = 2n ** 999n - 1n;
    expect(card).toContain(`n = ${String(n).slice(0, 80)}... (${String(n).length} in all)`);
    // the brute force over the steps the card names
    const steps = Number(/parity vector \((\d+) steps/.exec(card)![1]);
    let [v, max, at] = [n, n, 0];
    for (let j = 1; j <= steps; j++) {
      v = T(v);
      if (v > max) [max, at] = [v, j];
    }
    expect(card).toContain(`${String(max).slice(0, 80)}... (${String(max).length} in all) at step ${at}`);
    await page.close();
  });
});
