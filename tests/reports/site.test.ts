/**
 * The reports as a user gets them: the demo district built by the compiled CLI with PDFs, then every
 * page checked for what DESIGN.md and the reports issue promise.
 * - WCAG 2.2 A and AA rules by axe-core 4.14 (Deque; the rules' own WCAG mapping) in headless Chromium;
 * - Flesch–Kincaid grade ≤ 8 of each page's prose (Kincaid et al. 1975; tables and numbers removed);
 * - student ids and names only under counselors/ (HTML, and PDF text by pdftotext) and data/;
 * - PDFs tagged (pdfinfo: "Tagged: yes"), titles without student names.
 * Needs Chromium and poppler-utils (.ci/run installs them).
 */
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { findChromium, LAUNCH_ARGS } from "../../src/reports/pdf.js";
import { fleschKincaidGrade } from "../../src/stats/flesch-kincaid-grade.js";
import { textCounts } from "../../src/stats/text-counts.js";
import { buildDemo, type DemoSite, prose } from "./demo-site.js";

let site: DemoSite;
const html = (f: string) => readFileSync(join(site.dir, f), "utf8");
const pages = () => site.files.filter((f) => f.endsWith(".html"));
const pdfs = () => site.files.filter((f) => f.endsWith(".pdf"));

beforeAll(async () => {
  site = await buildDemo({ pdf: true });
}, 240_000);

describe("the built folder", () => {
  it("has every audience folder, the data tables and one PDF per audience (per caseload for check-ins)", () => {
    for (const f of [
      "index.html",
      "counselors/index.html",
      "content/index.html",
      "support/index.html",
      "about/index.html",
    ]) {
      expect(site.files).toContain(f);
    }
    for (const f of [
      "data/students.csv",
      "data/units.csv",
      "data/groups.csv",
      "data/trends.csv",
      "manifest.json",
    ]) {
      expect(site.files).toContain(f);
    }
    expect(pdfs().filter((f) => f.startsWith("counselors/")).length).toBeGreaterThanOrEqual(1);
    for (const a of ["content", "support", "about"]) expect(pdfs()).toContain(`${a}/${a}.pdf`);
  });

  it("gives every page lang, a unique title, landmarks, a skip link, the caution twice and the page facts", () => {
    const titles = new Set<string>();
    for (const f of pages()) {
      const h = html(f);
      expect(h, f).toMatch(/<html lang="en">/);
      const title = /<title>([^<]*)<\/title>/.exec(h)?.[1] ?? "";
      expect(titles.has(title), `${f}: duplicate title ${title}`).toBe(false);
      titles.add(title);
      expect(h, f).toContain('<main id="main">');
      expect(h, f).toContain('href="#main"');
      expect(
        h.match(/Do not use them for grades, discipline, placement, or to judge teachers/g)?.length,
        f,
      ).toBe(2);
      for (const fact of ["Purpose", "For", "Period", "Data", "Built", "Based on"])
        expect(h, f).toContain(`<dt>${fact}</dt>`);
      expect(h, f).not.toMatch(/<script|https?:\/\/(?!www\.w3\.org)/);
    }
  });

  it("marks student pages confidential", () => {
    const students = pages().filter((f) => /student-/.test(f));
    expect(students.length).toBeGreaterThan(0);
    for (const f of students) expect(html(f)).toContain('class="confidential"');
  });
});

describe("plain language", () => {
  it("keeps each page's prose at Flesch–Kincaid grade 8 or below", () => {
    for (const f of pages()) {
      const text = prose(html(f));
      const grade = fleschKincaidGrade(textCounts(text));
      expect(grade, `${f}: grade ${grade.toFixed(1)}`).toBeLessThanOrEqual(8);
    }
  });
});

describe("privacy", () => {
  it("shows no student id or name outside counselors/ (HTML and PDF text)", () => {
    const outside = [...pages(), ...pdfs()].filter((f) => !f.startsWith("counselors/"));
    for (const f of outside) {
      const content = f.endsWith(".pdf")
        ? execFileSync("pdftotext", [join(site.dir, f), "-"], { encoding: "utf8" })
        : html(f);
      for (const s of site.roster) {
        expect(new RegExp(`\\b${s.id}\\b`).test(content), `${f} holds ${s.id}`).toBe(false);
        if (s.name !== "") expect(content.includes(s.name), `${f} holds ${s.name}`).toBe(false);
      }
    }
  });
});

describe("PDFs", () => {
  it("are tagged and titled without student names", () => {
    for (const f of pdfs()) {
      const info = execFileSync("pdfinfo", [join(site.dir, f)], { encoding: "utf8" });
      expect(info, f).toMatch(/Tagged:\s+yes/);
      const title = /Title:\s+(.*)/.exec(info)?.[1] ?? "";
      for (const s of site.roster)
        if (s.name !== "") expect(title.includes(s.name), `${f} title`).toBe(false);
    }
  });
});

describe("accessibility (axe-core, WCAG 2.0/2.1/2.2 A and AA)", () => {
  let browser: import("puppeteer").Browser;
  beforeAll(async () => {
    const { default: puppeteer } = await import("puppeteer");
    browser = await puppeteer.launch({ executablePath: findChromium(), args: LAUNCH_ARGS });
  }, 60_000);
  afterAll(async () => {
    await browser?.close();
  });

  it("finds no violations on any page, at full width and at 320 px", async () => {
    const axe = readFileSync(createRequire(import.meta.url).resolve("axe-core/axe.min.js"), "utf8");
    const page = await browser.newPage();
    // The pages forbid scripts (Content-Security-Policy); the test lifts that to inject axe.
    await page.setBypassCSP(true);
    for (const width of [1280, 320]) {
      await page.setViewport({ width, height: 900 });
      for (const f of pages()) {
        await page.goto(pathToFileURL(join(site.dir, f)).href);
        await page.addScriptTag({ content: axe });
        // A string, evaluated in the page (its window and document are not this file's).
        const result = (await page.evaluate(`(async () => {
          const r = await axe.run({ runOnly: { type: "tag", values: ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"] } });
          return r.violations.map((v) => v.id + " (" + v.nodes.length + "): " + v.nodes.slice(0, 2).map((n) => n.target.join(" ")).join("; "));
        })()`)) as string[];
        expect(result, `${f} at ${width}px`).toEqual([]);
        if (width === 320) {
          const overflow = await page.evaluate(
            "document.documentElement.scrollWidth > window.innerWidth + 1",
          );
          expect(overflow, `${f} scrolls sideways at 320 px`).toBe(false);
        }
      }
    }
  }, 240_000);
});
