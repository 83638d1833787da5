/**
 * Never download a browser at install: it fails offline and surprises users.
 * The tool uses a system Chromium (see README: "A browser for the PDFs").
 * @type {import("puppeteer").Configuration}
 */
module.exports = { skipDownload: true };
