/**
 * The morning review: {@link dev.watcher.report.ReportWriter} turns a state directory (or a timeline file with
 * {@code history/} and {@code runs/} beside it) into one self-contained HTML file.
 *
 * <pre>
 *   timeline.jsonl --Timeline--> events per run --Verdict--> the line at the top of each run
 *   history/RUN.json --History--> bounded series --Charts--> plot data (JSON in the page)
 *   runs/RUN.json ---------------> counters, forecasts
 *                                   \--Page--> HTML: summary, per run verdict, plots, forecasts, actions, events
 * </pre>
 *
 * <p>The stage reads files, never the classes of the stages that wrote them: the history and run-state file
 * formats are the contract. Everything from those files is escaped ({@code Html}); the plotting library
 * (uPlot, from its WebJar), the styles and the page script are inlined, so the file opens offline and makes
 * no network request. The page script writes a self-check (plots built, canvases drawn, markers, errors) into
 * {@code #self-check}, which the browser test reads.
 */
package dev.watcher.report;
