/**
 * Fixed wording of the reports, in one place. Plain words, short sentences: every page's prose is
 * tested to read at grade 8 or below (Flesch–Kincaid).
 */
export const text = {
  caution:
    "These figures are estimates from automated detectors, and detectors are often wrong about a single moment. Use them only to start low-stakes support talks. Do not use them for grades, discipline, placement, or to judge teachers. Follow local policy, the law, and your own professional judgment.",
  footer:
    "Made by engagement-report. For low-stakes support only; not for grades, discipline, placement or judging teachers.",
  checkBeforeActing: [
    "Talk with the student's teacher first. They may know a reason, such as a hard week or a change at home.",
    "Look at the class and unit notes on this page. If many classmates show the same, the cause may be the content or the setting.",
    "Remember that detectors make mistakes. Treat this as a reason to ask, not as a finding.",
    "Follow your school's policy on who may see this page.",
  ],
  teacherStatement: [
    "These figures describe how students worked with the software. They do not measure a teacher's skill, and they must not be used to rate, rank or judge teachers.",
    "Three reasons. First, the figures are rough: each class has a wide plausible range, and small classes are withheld. Second, they show links, not causes: a class may differ because of its schedule, its content, its students or the room, not its teacher. Third, any ranking would change with the method: small changes in how the figures are made would move classes up or down.",
    "The American Statistical Association made the same points about teacher ratings from test scores in its 2014 statement on value-added models. Use these pages to plan support and training, together with the people who teach the classes.",
  ],
  howToRead: [
    "Each figure is an estimate with a plausible range. The range shows how sure the figure is: a wide range means we know little.",
    "A ratio compares a student with other students on the same units. A ratio of 1 means the same as others; 2 means twice as often.",
    "Share of time is how much of the observed time the detector estimates the student was in that state, after a correction for the detector's known errors.",
    "A check-in is suggested only when the whole plausible range is past the line, not just the middle value.",
    "Too little data means the student had too few sessions, days or minutes for a fair figure. These students are listed, not hidden.",
  ],
};

/** Student, class and unit counts in bands, so that content pages do not give exact small counts. */
export function band(n: number): string {
  const bands: [number, number][] = [
    [10, 24],
    [25, 49],
    [50, 99],
    [100, 249],
    [250, 499],
    [500, 999],
  ];
  if (n < 10) return "fewer than 10";
  for (const [lo, hi] of bands) if (n >= lo && n <= hi) return `${lo} to ${hi}`;
  return "1,000 or more";
}
