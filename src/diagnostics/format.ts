import { messages } from "./messages.js";
import { showInvisible } from "./visible.js";
import { formatPath, type SpecIssue } from "./issue.js";

/** Renders one issue for a terminal: location first, then the message, then a caret line. */
export function formatIssue(issue: SpecIssue, file?: string): string {
  const where = `${file ? file + ": " : ""}at ${formatPath(issue.path)}`;
  const lines = [`error ${where}: ${issue.message}`];
  if (issue.source) {
    const { text, column, length = 1 } = issue.source;
    // tabs and line breaks would misalign the caret: show each as one space, keeping columns
    lines.push(`    ${text.replace(/[\t\n\r\v\f]/g, " ")}`);
    lines.push(`    ${" ".repeat(Math.max(0, column - 1))}${"^".repeat(Math.max(1, length))}`);
  }
  return lines.join("\n");
}

/** Issues printed in full; a spec with more (10 000 states, each faulty) gets a count of the rest. */
export const MAX_SHOWN_ISSUES = 50;

export function formatIssues(issues: SpecIssue[], file?: string): string {
  const shown = issues.slice(0, MAX_SHOWN_ISSUES).map((i) => formatIssue(i, file));
  const n = issues.length;
  if (n > MAX_SHOWN_ISSUES) shown.push(messages.moreIssues(n - MAX_SHOWN_ISSUES));
  shown.push(`${n} error${n === 1 ? "" : "s"} in the spec; nothing was written.`);
  // a file name, key or text may hold terminal controls: shown, never obeyed
  return showInvisible(shown.join("\n"));
}
