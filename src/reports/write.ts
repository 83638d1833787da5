/** Writes the site's pages into the output folder and says which PDFs to print from them. */
import { mkdirSync, writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import type { PdfJob } from "./pdf.js";
import type { SitePage } from "./site.js";

export function writeSite(dir: string, pages: readonly SitePage[]): void {
  for (const p of pages) {
    const file = join(dir, ...p.path.split("/"));
    mkdirSync(dirname(file), { recursive: true });
    writeFileSync(file, p.html);
  }
}

/**
 * One PDF per audience folder; for check-ins one per caseload, holding the caseload list and the
 * page of every student with a suggested check-in (or every student page when `allStudents`).
 */
export function pdfJobs(
  dir: string,
  pages: readonly SitePage[],
  siteTitle: string,
  allStudents = false,
): PdfJob[] {
  const jobs: PdfJob[] = [];
  const lists = pages.filter((p) => p.audience === "counselors" && p.caseload && !p.student);
  for (const list of lists) {
    const students = pages.filter(
      (p) => p.caseload === list.caseload && p.student && (allStudents || p.checkIn),
    );
    jobs.push({
      path: join(dir, "counselors", list.caseload as string, `summary-${list.caseload}.pdf`),
      title: `${list.title}, ${siteTitle}`,
      pages: [list.html, ...students.map((s) => s.html)],
    });
  }
  for (const audience of ["content", "support", "about"] as const) {
    const list = pages.filter((p) => p.audience === audience);
    if (list.length === 0) continue;
    jobs.push({
      path: join(dir, audience, `${audience}.pdf`),
      title: `${list[0]?.title}, ${siteTitle}`,
      pages: list.map((p) => p.html),
    });
  }
  return jobs;
}
