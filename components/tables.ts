// Every component that draws a table with @tanstack/react-table, fetched as one file on first use
// (see lazy-tables.tsx). Keeping them together keeps the table library out of the first screen.
export { DictionaryEditor } from "./curation/dictionary-editor";
export { ProblemReportTable } from "./curation/problem-report-table";
export { SiteYearTable } from "./evidence/site-year-table";
export { VersionRowsGrid } from "./review/version-rows-grid";
