/** The pieces of PDF printing that need no browser: finding one, joining pages, fixing the dates. */
import { describe, expect, it } from "vitest";
import { InputError } from "../../src/errors.js";
import { bundle, findChromium, stampPdfDates } from "../../src/reports/pdf.js";

describe("findChromium", () => {
  it("names the variable and the missing path, and says what to do", () => {
    expect.assertions(3);
    try {
      findChromium({ ENGAGEMENT_REPORT_CHROMIUM: "/nowhere/chromium" });
    } catch (error) {
      expect(error).toBeInstanceOf(InputError);
      expect((error as Error).message).toContain("ENGAGEMENT_REPORT_CHROMIUM");
      expect((error as Error).message).toContain("/nowhere/chromium");
    }
  });
});

describe("bundle", () => {
  const page = (title: string, body: string) =>
    `<!doctype html><html lang="en"><head><title>${title}</title><style>p{}</style></head><body><nav>x</nav><main id="main">${body}</main></body></html>`;

  it("keeps the first page's head with the bundle's title and every page's main content, in order", () => {
    const html = bundle("Caseload <A>", [page("one", "<p>first</p>"), page("two", "<p>second</p>")]);
    expect(html).toContain("<title>Caseload &lt;A&gt;</title>");
    expect(html).toContain("<style>p{}</style>");
    expect(html.indexOf("first")).toBeLessThan(html.indexOf("second"));
    expect(html).not.toContain("<nav>");
    expect(html.match(/<main id="main">/g)).toHaveLength(1);
    expect(html).toContain('<section class="page-break"><p>second</p></section>');
  });
});

describe("stampPdfDates", () => {
  it("replaces the 14 digits of both dates with the build time, keeping the length (PDF 1.7, 7.9.4)", () => {
    // PDF date strings are D:YYYYMMDDHHmmSS followed by the offset (ISO 32000-1:2008, §7.9.4).
    const pdf = Buffer.from(
      "1 0 obj <</CreationDate (D:20261202111456+00'00')\n/ModDate (D:20261202111457+00'00')>>",
      "latin1",
    );
    const out = stampPdfDates(pdf, new Date("2026-11-30T12:00:00Z"));
    expect(out.length).toBe(pdf.length);
    expect(out.toString("latin1")).toBe(
      "1 0 obj <</CreationDate (D:20261130120000+00'00')\n/ModDate (D:20261130120000+00'00')>>",
    );
  });
});
