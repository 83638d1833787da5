/**
 * PDFs printed from the same HTML by headless Chromium (puppeteer, with the system's Chromium: the
 * package downloads no browser). One PDF per audience, and per caseload for check-ins: the pages of
 * the bundle are joined into one document with page breaks, because one long document prints about
 * twice as fast as many one-page ones. Tagged (for assistive technology) and with an outline; a
 * running header with the caution and a footer with page numbers; the caution is also in each
 * page's body, since running headers are not read aloud.
 */
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { InputError } from "../errors.js";
import { escapeHtml } from "./html.js";

export interface PdfJob {
  /** Absolute path of the PDF to write. */
  readonly path: string;
  /** Document title (never a student's name). */
  readonly title: string;
  /** Full HTML pages, in order. */
  readonly pages: readonly string[];
}

const CANDIDATES = [
  "/usr/bin/chromium",
  "/usr/bin/chromium-browser",
  "/usr/bin/google-chrome",
  "/usr/bin/google-chrome-stable",
];

/** The browser to print with: ENGAGEMENT_REPORT_CHROMIUM, PUPPETEER_EXECUTABLE_PATH, or a usual system path. */
export function findChromium(env: NodeJS.ProcessEnv = process.env): string {
  for (const name of ["ENGAGEMENT_REPORT_CHROMIUM", "PUPPETEER_EXECUTABLE_PATH"]) {
    const v = env[name];
    if (v) {
      if (!existsSync(v))
        throw new InputError(
          `${name} is set to ${v}, but no file is there. Point it at a Chromium or Chrome executable.`,
        );
      return v;
    }
  }
  for (const c of CANDIDATES) if (existsSync(c)) return c;
  throw new InputError(
    "no Chromium found to print the PDFs. Install one (on Debian or Ubuntu: sudo apt-get install chromium), or set ENGAGEMENT_REPORT_CHROMIUM to its path, or build without PDFs with --no-pdf.",
  );
}

export const LAUNCH_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

/** Joins full pages into one printable document: the first page's head, every page's main content. */
export function bundle(title: string, pages: readonly string[]): string {
  const first = pages[0] ?? "";
  const head = first
    .slice(0, first.indexOf("</head>"))
    .replace(/<title>[^<]*<\/title>/, `<title>${escapeHtml(title).html}</title>`);
  const mains = pages.map((p, i) => {
    const start = p.indexOf('<main id="main">');
    const end = p.lastIndexOf("</main>");
    const inner = start >= 0 && end > start ? p.slice(start + '<main id="main">'.length, end) : p;
    return `<section${i > 0 ? ' class="page-break"' : ""}>${inner}</section>`;
  });
  return `${head}</head>\n<body>\n<main id="main">\n${mains.join("\n")}\n</main>\n</body>\n</html>\n`;
}

/**
 * Chromium stamps each PDF's /CreationDate and /ModDate with the time of printing. With a fixed
 * build time in the settings the whole output folder should be byte-identical from run to run, so
 * the 14 digits of both dates are replaced by the build time (UTC), same length, offsets untouched.
 */
export function stampPdfDates(pdf: Buffer, when: Date): Buffer {
  const digits = when.toISOString().replace(/[-:T]/g, "").slice(0, 14);
  const text = pdf
    .toString("latin1")
    .replace(/\/(CreationDate|ModDate) \(D:\d{14}/g, (_m, key: string) => `/${key} (D:${digits}`);
  return Buffer.from(text, "latin1");
}

/** Tabs printing at once. */
export const PRINTING_TABS = 2;

/**
 * Letter pages, tagged, with an outline and the running caution. The margins are as narrow as the
 * 8px header and footer allow: 12/11/10 mm print the 1,000-student demo's check-ins in 2,102 pages
 * against 2,277 with 18/16/14 mm (8% less paper); the printing time was the same within 2% in
 * paired runs, so the running header and footer cost time per document, not per page.
 * scripts/bench/stages.ts prints with the same options for its comparison.
 */
const PDF_OPTIONS = {
  format: "Letter",
  printBackground: true,
  tagged: true,
  outline: true,
  displayHeaderFooter: true,
  headerTemplate:
    '<div style="font-size:8px;width:100%;text-align:center;color:#333;">For low-stakes support only. Not for grades, discipline, placement or judging teachers.</div>',
  footerTemplate:
    '<div style="font-size:8px;width:100%;text-align:center;color:#333;">Page <span class="pageNumber"></span> of <span class="totalPages"></span></div>',
  margin: { top: "12mm", bottom: "11mm", left: "10mm", right: "10mm" },
} as const;

export async function printPdfs(jobs: readonly PdfJob[], chromium: string, fixedTime?: Date): Promise<void> {
  if (jobs.length === 0) return;
  const { default: puppeteer } = await import("puppeteer");
  const profile = mkdtempSync(join(tmpdir(), "engagement-report-chromium-"));
  const work = mkdtempSync(join(tmpdir(), "engagement-report-print-"));
  const browser = await puppeteer.launch({
    executablePath: chromium,
    args: [...LAUNCH_ARGS, `--user-data-dir=${profile}`],
  });
  try {
    // Two tabs print at once (the machine's two cores): jobs are taken from one queue, biggest first
    // so that the last one to finish is a small one.
    const queue = jobs
      .map((job, i) => ({ job, i, size: job.pages.reduce((t, p) => t + p.length, 0) }))
      .sort((a, b) => b.size - a.size || a.i - b.i);
    const worker = async () => {
      const page = await browser.newPage();
      for (let next = queue.shift(); next; next = queue.shift()) {
        const file = join(work, `bundle-${next.i}.html`);
        writeFileSync(file, bundle(next.job.title, next.job.pages));
        await page.goto(pathToFileURL(file).href, { waitUntil: "load" });
        await page.pdf({ path: next.job.path, ...PDF_OPTIONS });
        if (fixedTime) writeFileSync(next.job.path, stampPdfDates(readFileSync(next.job.path), fixedTime));
      }
      await page.close();
    };
    await Promise.all(Array.from({ length: Math.min(PRINTING_TABS, jobs.length) }, worker));
  } finally {
    await browser.close();
    rmSync(profile, { recursive: true, force: true });
    rmSync(work, { recursive: true, force: true });
  }
}
