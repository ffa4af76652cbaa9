package dev.watcher.report;

import com.fasterxml.jackson.core.JsonProcessingException;
import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.node.ArrayNode;
import com.fasterxml.jackson.databind.node.ObjectNode;
import java.time.Instant;
import java.time.ZoneId;
import java.time.format.DateTimeFormatter;
import java.time.format.TextStyle;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.Iterator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;
import java.util.TreeMap;

/**
 * Writes the report's HTML: a summary table when there are several runs, then per run the verdict, the
 * plots, forecasts, actions and the event table. Every text that comes from the timeline, the history or the
 * run state passes through {@link Html#text} (or, inside the data script, {@link Html#scriptSafe}).
 */
final class Page {

    /** At most this many rows in a run's event table; the rest are counted in a note. */
    static final int MAX_ROWS = 1500;

    private final ZoneId zone;
    private final DateTimeFormatter time;
    private final StringBuilder out = new StringBuilder(1 << 16);
    private final ArrayNode charts = Charts.JSON.createArrayNode();
    private int chartNo;

    Page(ZoneId zone) {
        this.zone = zone;
        this.time = DateTimeFormatter.ofPattern("yyyy-MM-dd HH:mm:ss", Locale.ROOT).withZone(zone);
    }

    /** The zone's name as the page gives it: its id and, at {@code when}, its offset from UTC. */
    String zoneName(Instant when) {
        String off = zone.getRules().getOffset(when).getId();
        String id = zoneId();
        if (id.equals("UTC")) {
            return id;
        }
        return id + " (UTC" + (off.equals("Z") ? "" : off) + ")";
    }

    /** The zone's id, with the UTC offset zone named {@code UTC} rather than {@code Z}. */
    String zoneId() {
        String id = zone.getId();
        return id.equals("Z") || id.equals("UTC") || id.equals("Etc/UTC") ? "UTC" : id;
    }

    String render(String source, List<RunData> runs, long unreadable, boolean historyFound, String css,
            String plotCss, String plotJs, String pageJs, Instant now) {
        out.append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n")
                .append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n")
                .append("<title>Morning review: ").append(Html.text(runs.size() == 1 ? runs.get(0).name()
                        : runs.size() + " runs")).append("</title>\n")
                .append("<style>").append(plotCss).append("</style>\n")
                .append("<style>").append(css).append("</style>\n</head>\n<body>\n");
        out.append("<header class=\"mast\"><h1>Morning review</h1>\n<p class=\"meta\">From <code>")
                .append(Html.text(source)).append("</code>, written ").append(time.format(now)).append(' ')
                .append(Html.text(zoneName(now))).append(". All times are in ").append(Html.text(zoneId()))
                .append(zoneId().equals("UTC") ? "" : " (" + Html.text(zone.getDisplayName(TextStyle.FULL,
                        Locale.ENGLISH)) + ")")
                .append("; the timeline file itself keeps UTC.</p>\n");
        if (!historyFound) {
            out.append("<p class=\"note\"><strong>Events only:</strong> no series history was found beside the"
                    + " timeline (<code>history/</code>), so this report has no plots.</p>\n");
        }
        if (unreadable > 0) {
            out.append("<p class=\"note\">").append(Numbers.count(unreadable))
                    .append(" unreadable timeline line(s) were skipped.</p>\n");
        }
        out.append("</header>\n<main>\n");
        if (runs.isEmpty()) {
            out.append("<p class=\"note\">The timeline holds no events and no run history was found.</p>\n");
        }
        if (runs.size() > 1) {
            summary(runs);
        }
        for (int i = 0; i < runs.size(); i++) {
            run(i, runs.get(i));
        }
        out.append("</main>\n<footer><p>Written by watcher. Verdicts say whether a run meets the configured"
                + " criteria; they are not a judgement of the physics. Severity is shown by word and shape:"
                + " \u25bc critical, \u25c6 warning, \u25a0 info; \u25cb marks where a condition resolved.</p>"
                + "</footer>\n");
        String data;
        try {
            ObjectNode root = Charts.JSON.createObjectNode();
            root.set("charts", charts);
            data = Html.scriptSafe(Charts.JSON.writeValueAsString(root));
        } catch (JsonProcessingException e) {
            throw new IllegalStateException(e);
        }
        out.append("<pre id=\"self-check\" hidden></pre>\n");
        out.append("<script type=\"application/json\" id=\"report-data\">").append(data).append("</script>\n");
        out.append("<script>").append(plotJs.replace("</script", "<\\/script")).append("</script>\n");
        out.append("<script>").append(pageJs).append("</script>\n</body></html>\n");
        return out.toString();
    }

    private void summary(List<RunData> runs) {
        out.append("<section class=\"summary\"><h2>Runs at a glance</h2>\n<table class=\"grid\"><thead><tr>")
                .append("<th>Run</th><th>Verdict</th><th class=\"num\">Last iteration</th>")
                .append("<th class=\"num\">Open warnings / critical</th><th class=\"num\">Events</th>")
                .append("<th>Actions</th><th class=\"num\">Core-hours saved</th></tr></thead><tbody>\n");
        for (int i = 0; i < runs.size(); i++) {
            RunData r = runs.get(i);
            Verdict v = r.verdict();
            long open = Verdict.openAtEnd(r.events()).values().stream().filter(e -> !e.severity().equals("info"))
                    .count();
            out.append("<tr><td><a href=\"#run-").append(i + 1).append("\">").append(Html.text(r.name()))
                    .append("</a></td><td>").append(badge(v)).append(' ').append(Html.text(v.text()))
                    .append("</td><td class=\"num\">").append(Numbers.count(lastIter(r))).append("</td>")
                    .append("<td class=\"num\">").append(open).append("</td><td class=\"num\">")
                    .append(Numbers.count(r.events().size() + r.skipped().values().stream()
                            .mapToLong(Long::longValue).sum())).append("</td><td>")
                    .append(Html.text(actionsLine(r))).append("</td><td class=\"num\">")
                    .append(Html.text(coreHoursShort(r))).append("</td></tr>\n");
        }
        out.append("</tbody></table></section>\n");
    }

    private static long lastIter(RunData r) {
        long m = r.state().path("last_iter").asLong(0);
        for (Event e : r.events()) {
            m = Math.max(m, e.iter());
        }
        if (r.history() != null) {
            m = Math.max(m, r.history().lastIter());
        }
        return m;
    }

    private static String actionsLine(RunData r) {
        Map<String, Integer> n = new TreeMap<>();
        for (Event e : r.events()) {
            if (e.is("action")) {
                n.merge(e.state(), 1, Integer::sum);
            }
        }
        if (n.isEmpty()) {
            return "none";
        }
        List<String> parts = new ArrayList<>();
        n.forEach((k, v) -> parts.add(v + " " + k));
        return String.join(", ", parts);
    }

    /** Core-hours saved by a stop that was carried out: the largest figure an action event gave. */
    private static double coreHours(RunData r, boolean wouldOnly) {
        double best = Double.NaN;
        for (Event e : r.events()) {
            if (!e.is("action")) {
                continue;
            }
            boolean would = e.state().equals("would-stop");
            boolean carried = e.state().equals("done") || e.state().equals("signalled")
                    || e.state().equals("requested");
            if ((wouldOnly && would) || (!wouldOnly && carried)) {
                double v = e.number("core_hours_saved");
                if (Double.isFinite(v) && !(v <= best)) {
                    best = v;
                }
            }
        }
        return best;
    }

    private static String coreHoursShort(RunData r) {
        double v = coreHours(r, false);
        if (Double.isFinite(v)) {
            return Numbers.hours(v);
        }
        double w = coreHours(r, true);
        return Double.isFinite(w) ? "(would have: " + Numbers.hours(w) + ")" : "\u2013";
    }

    private static String badge(Verdict v) {
        String glyph = switch (v.kind()) {
            case CONVERGED -> "\u2713";
            case STOPPED -> "\u25a0";
            case BLEW_UP -> "\u2715";
            case ENDED -> "\u25cf";
            case RUNNING -> "\u25b6";
            case NO_DATA -> "?";
        };
        return "<span class=\"badge " + v.cssClass() + "\">" + glyph + " " + Html.text(v.kind().label())
                + "</span>";
    }

    private void run(int index, RunData r) {
        Verdict v = r.verdict();
        out.append("<section class=\"run\" id=\"run-").append(index + 1).append("\">\n<h2>Run <span class=\"rn\">")
                .append(Html.text(r.name())).append("</span></h2>\n");
        out.append("<p class=\"verdict ").append(v.cssClass()).append("\">").append(badge(v)).append(' ')
                .append(Html.text(v.text())).append("</p>\n");
        facts(r);
        History h = r.history();
        if (h == null) {
            out.append("<p class=\"note\">No series history for this run: events only.</p>\n");
        } else {
            if (!h.residuals().isEmpty()) {
                out.append("<h3>Residuals</h3>\n");
                figure(Charts.residuals(nextId(), h, r.events()), "tall");
            }
            if (!h.monitors().isEmpty()) {
                out.append("<h3>Monitors</h3>\n<div class=\"monitors\">\n");
                for (Map.Entry<String, History.Track> m : h.monitors().entrySet()) {
                    figure(Charts.monitor(nextId(), m.getKey(), m.getValue(), r.events(),
                            predictedFinal(r, m.getKey())), "short");
                }
                out.append("</div>\n");
            }
            if (h.unsteady()) {
                out.append("<h3>Per-step peaks and floors</h3>\n");
                figure(Charts.steps(nextId(), h, r.events()), "tall");
            }
        }
        forecasts(r);
        actions(r);
        events(r);
        out.append("</section>\n");
    }

    private String nextId() {
        return "plot-" + (++chartNo);
    }

    private void facts(RunData r) {
        JsonNode s = r.state();
        JsonNode c = s.path("counters");
        List<String[]> f = new ArrayList<>();
        f.add(new String[] {"last iteration", Numbers.count(lastIter(r))});
        Instant first = null;
        Instant last = null;
        for (Event e : r.events()) {
            if (e.at() != null) {
                first = first == null ? e.at() : first;
                last = e.at();
            }
        }
        if (first != null) {
            f.add(new String[] {"first event", time.format(first)});
            f.add(new String[] {"last event", time.format(last)});
        }
        if (!c.isMissingNode()) {
            f.add(new String[] {"lines read", Numbers.count(c.path("lines").asLong())});
            f.add(new String[] {"records", Numbers.count(c.path("records").asLong())});
            if (c.path("segments").asLong() > 0) {
                f.add(new String[] {"segments (restarts)", Numbers.count(c.path("segments").asLong())});
            }
            long bad = 0;
            List<String> kinds = new ArrayList<>();
            for (Iterator<Map.Entry<String, JsonNode>> it = c.path("malformed").fields(); it.hasNext();) {
                Map.Entry<String, JsonNode> m = it.next();
                bad += m.getValue().asLong();
                kinds.add(m.getKey() + " " + m.getValue().asLong());
            }
            f.add(new String[] {"malformed lines skipped", Numbers.count(bad) + (kinds.isEmpty() ? ""
                    : " (" + String.join(", ", kinds) + ")")});
        }
        if (s.has("caught_up")) {
            f.add(new String[] {"caught up with the log", s.path("caught_up").asBoolean() ? "yes" : "no"});
        }
        double rate = Numbers.of(s.path("wall_forecast").get("iterations_per_second"));
        if (rate > 0) {
            double over = Numbers.of(s.path("wall_forecast").get("rate_seconds"));
            f.add(new String[] {"iteration rate (last save)", Numbers.show(rate) + " per second"
                    + (over > 0 ? " over the last " + Numbers.duration(Math.round(over)) : "")});
        }
        out.append("<dl class=\"facts\">");
        for (String[] kv : f) {
            out.append("<div><dt>").append(Html.text(kv[0])).append("</dt><dd>").append(Html.text(kv[1]))
                    .append("</dd></div>");
        }
        out.append("</dl>\n");
    }

    private void figure(Charts.Chart c, String size) {
        charts.add(c.spec());
        out.append("<figure class=\"plot ").append(size).append("\">\n<ul class=\"legend\">");
        for (Charts.Line l : c.legend()) {
            out.append("<li>").append(swatch(l)).append(Html.text(l.label())).append("</li>");
        }
        out.append("</ul>\n<div class=\"canvas\" id=\"").append(c.id()).append("\"></div>\n<figcaption>")
                .append(Html.text(c.caption())).append("</figcaption>\n</figure>\n");
    }

    private static String swatch(Charts.Line l) {
        StringBuilder d = new StringBuilder();
        for (int v : l.dash()) {
            d.append(d.length() == 0 ? "" : " ").append(v);
        }
        return "<svg class=\"sw\" width=\"34\" height=\"10\" aria-hidden=\"true\"><line x1=\"1\" y1=\"5\" x2=\"33\""
                + " y2=\"5\" stroke=\"" + Html.text(l.colour()) + "\" stroke-width=\"" + Math.min(l.width(), 6) + "\""
                + (d.length() == 0 ? "" : " stroke-dasharray=\"" + d + "\"") + "/></svg>";
    }

    /** A monitor's predicted final value: the saved forecasts first, else the last evidence that gave one. */
    static double predictedFinal(RunData r, String monitor) {
        for (String det : new String[] {"ConvergedDetector", "MonitorSettledDetector"}) {
            double v = Numbers.of(r.snapshot(det).path("monitors").path(monitor).get("predicted_final"));
            if (Double.isFinite(v)) {
                return v;
            }
        }
        double v = Double.NaN;
        for (Event e : r.events()) {
            if (e.is("detection") && monitor.equals(e.monitor())) {
                double p = Numbers.of(e.evidence().get("predicted_final"));
                if (Double.isFinite(p)) {
                    v = p;
                }
            }
        }
        return v;
    }

    private void forecasts(RunData r) {
        JsonNode conv = r.snapshot("ConvergedDetector");
        JsonNode eqs = conv.path("equations");
        JsonNode mons = conv.path("monitors");
        JsonNode settled = r.snapshot("MonitorSettledDetector").path("monitors");
        if (eqs.size() == 0 && mons.size() == 0 && settled.size() == 0) {
            out.append("<h3>Forecasts</h3>\n<p class=\"note\">No forecasts were saved for this run (no run state"
                    + " beside the timeline, or the detectors had too few records).</p>\n");
            return;
        }
        out.append("<h3>Forecasts</h3>\n");
        String verdict = conv.path("verdict").asText("");
        if (!verdict.isEmpty()) {
            out.append("<p>Convergence judge at the last save: <strong>").append(Html.text(verdict))
                    .append("</strong>");
            JsonNode wait = conv.path("waiting_for");
            if (wait.isArray() && wait.size() > 0) {
                List<String> w = new ArrayList<>();
                wait.forEach(x -> w.add(x.asText()));
                out.append("; waiting for ").append(Html.text(String.join(", ", w)));
            }
            out.append(".</p>\n");
        }
        JsonNode wall = r.state().path("wall_forecast").path("equations");
        if (eqs.size() > 0) {
            out.append("<table class=\"grid\"><thead><tr><th>Equation</th><th class=\"num\">Residual</th>")
                    .append("<th class=\"num\">Target</th><th>Forecast</th>")
                    .append("<th class=\"num\">Iterations to target (range)</th>")
                    .append(wall.size() > 0 ? "<th class=\"num\">Wall time to target (range)</th>" : "")
                    .append("<th class=\"num\">Slope (decades / iteration)</th></tr></thead><tbody>\n");
            for (Iterator<Map.Entry<String, JsonNode>> it = eqs.fields(); it.hasNext();) {
                Map.Entry<String, JsonNode> e = it.next();
                JsonNode f = e.getValue();
                double it0 = Numbers.of(f.get("iterations"));
                double lo = Numbers.of(f.get("iterations_low"));
                double hi = Numbers.of(f.get("iterations_high"));
                String iters = Double.isFinite(it0) ? Numbers.count(Math.round(it0))
                        + (Double.isFinite(lo) && Double.isFinite(hi) && (lo != it0 || hi != it0)
                                ? " (" + Numbers.count(Math.round(Math.min(lo, hi))) + "\u2013"
                                        + Numbers.count(Math.round(Math.max(lo, hi))) + ")" : "") : "\u2013";
                out.append("<tr><td>").append(Html.text(e.getKey())).append("</td><td class=\"num\">")
                        .append(Html.text(Numbers.show(Numbers.of(f.get("residual"))))).append("</td><td class=\"num\">")
                        .append(Html.text(Numbers.show(Numbers.of(f.get("target"))))).append("</td><td>")
                        .append(Html.text(f.path("forecast").asText("\u2013"))).append("</td><td class=\"num\">")
                        .append(Html.text(iters)).append("</td><td class=\"num\">");
                if (wall.size() > 0) {
                    out.append(Html.text(wallTime(wall.path(e.getKey())))).append("</td><td class=\"num\">");
                }
                out.append(Html.text(shown(f.get("slope_decades_per_iteration")))).append("</td></tr>\n");
            }
            out.append("</tbody></table>\n");
            if (wall.size() > 0) {
                out.append("<p>Wall times assume the iteration rate of the last save goes on (")
                        .append(Html.text(Numbers.show(Numbers.of(r.state().path("wall_forecast")
                                .get("iterations_per_second"))))).append(" per second); the range is the")
                        .append(" fit's interval only.</p>\n");
            }
        }
        Map<String, JsonNode> monitors = new LinkedHashMap<>();
        settled.fields().forEachRemaining(e -> monitors.put(e.getKey(), e.getValue()));
        mons.fields().forEachRemaining(e -> monitors.put(e.getKey(), e.getValue()));
        if (!monitors.isEmpty()) {
            out.append("<table class=\"grid\"><thead><tr><th>Monitor</th><th>State</th><th class=\"num\">Value</th>")
                    .append("<th class=\"num\">\u00b1 half-width</th><th class=\"num\">Predicted final</th>")
                    .append("<th class=\"num\">Remaining error</th></tr></thead><tbody>\n");
            for (Map.Entry<String, JsonNode> e : monitors.entrySet()) {
                JsonNode m = e.getValue();
                JsonNode value = m.has("value") ? m.get("value") : m.get("mean");
                out.append("<tr><td>").append(Html.text(e.getKey())).append("</td><td>")
                        .append(Html.text(m.path("state").asText("\u2013"))).append("</td><td class=\"num\">")
                        .append(Html.text(shown(value))).append("</td><td class=\"num\">")
                        .append(Html.text(shown(m.has("half_width") ? m.get("half_width") : m.get("amplitude"))))
                        .append("</td><td class=\"num\">").append(Html.text(shown(m.get("predicted_final"))))
                        .append("</td><td class=\"num\">").append(Html.text(shown(m.get("remaining_error"))))
                        .append("</td></tr>\n");
            }
            out.append("</tbody></table>\n");
        }
    }

    /** An equation's wall time to target with its range, from the run state's wall forecast; a dash without. */
    private static String wallTime(JsonNode w) {
        double t = Numbers.of(w.get("seconds"));
        if (!(t >= 0)) {
            return "\u2013";
        }
        double lo = Numbers.of(w.get("seconds_low"));
        double hi = Numbers.of(w.get("seconds_high"));
        String s = Numbers.duration(Math.round(t));
        if (lo >= 0 && hi >= 0 && (lo != t || hi != t)) {
            s += " (" + Numbers.duration(Math.round(Math.min(lo, hi))) + "\u2013"
                    + Numbers.duration(Math.round(Math.max(lo, hi))) + ")";
        }
        return s;
    }

    private static String shown(JsonNode n) {
        double v = Numbers.of(n);
        // a forecast that has no value (NaN) is shown as a dash; an infinite one as the value it is
        return Double.isNaN(v) ? "\u2013" : Numbers.show(v);
    }

    private void actions(RunData r) {
        List<Event> acts = r.events().stream().filter(e -> e.is("action")).toList();
        out.append("<h3>Actions and core-hours</h3>\n");
        if (acts.isEmpty()) {
            out.append("<p>No action was taken or proposed for this run.</p>\n");
            return;
        }
        double saved = coreHours(r, false);
        double would = coreHours(r, true);
        out.append("<p>");
        if (Double.isFinite(saved)) {
            out.append("Core-hours saved by stopping the job: <strong>").append(Html.text(Numbers.hours(saved)))
                    .append("</strong>");
            String note = null;
            for (Event e : acts) {
                if (e.text("core_hours_note") != null) {
                    note = e.text("core_hours_note");
                }
            }
            if (note != null) {
                out.append(" (").append(Html.text(note)).append(')');
            }
            out.append(". ");
        } else if (Double.isFinite(would)) {
            out.append("A stop was only proposed (stopping was not allowed); it would have saved up to <strong>")
                    .append(Html.text(Numbers.hours(would))).append("</strong> core-hours. ");
        } else {
            out.append("No core-hours figure was recorded (the job's size or time limit was not known). ");
        }
        out.append(Html.text(actionsLine(r))).append(".</p>\n");
    }

    private void events(RunData r) {
        List<Event> all = r.events();
        List<Event> shown = all;
        Map<String, Long> left = new TreeMap<>(r.skipped());
        if (all.size() > MAX_ROWS) {
            List<Event> ranked = new ArrayList<>(all);
            ranked.sort(Comparator.comparingInt((Event e) -> -importance(e)).thenComparingLong(Event::seq));
            shown = new ArrayList<>(ranked.subList(0, MAX_ROWS));
            for (Event e : ranked.subList(MAX_ROWS, ranked.size())) {
                left.merge(Timeline.kind(e), 1L, Long::sum);
            }
            shown.sort(Comparator.comparingLong(Event::seq));
        }
        out.append("<h3>Events</h3>\n");
        if (all.isEmpty()) {
            out.append("<p class=\"note\">No events for this run.</p>\n");
            return;
        }
        if (!left.isEmpty()) {
            long n = left.values().stream().mapToLong(Long::longValue).sum();
            List<String> parts = new ArrayList<>();
            left.forEach((k, v) -> parts.add(v + " " + k));
            out.append("<p class=\"note\">").append(Numbers.count(n + shown.size())).append(" events; the ")
                    .append(Numbers.count(shown.size())).append(" most important are listed, ")
                    .append(Numbers.count(n)).append(" left out: ").append(Html.text(String.join(", ", parts)))
                    .append(". The timeline file holds them all.</p>\n");
        }
        out.append("<table class=\"grid events\"><thead><tr><th class=\"num\">#</th><th>Time (")
                .append(Html.text(zoneId())).append(")</th><th class=\"num\">Iteration</th><th>Severity</th>")
                .append("<th>Event</th><th>What happened</th><th>Remedy</th></tr></thead><tbody>\n");
        for (Event e : shown) {
            row(e);
        }
        out.append("</tbody></table>\n");
    }

    private static int importance(Event e) {
        return switch (e.type()) {
            case "action" -> 5;
            case "run" -> 4;
            case "notice" -> e.state().equals("failed") || e.state().equals("gave-up") ? 3 : 1;
            case "detection" -> !e.severity().equals("info") ? 3
                    : "residual-level".equals(e.pattern()) ? 1 : 2;
            default -> 0;
        };
    }

    private void row(Event e) {
        String sev = e.severity();
        out.append("<tr class=\"t-").append(Html.text(e.type())).append(" s-").append(Html.text(sev))
                .append("\"><td class=\"num\">").append(e.seq()).append("</td><td class=\"nowrap\">")
                .append(e.at() == null ? "\u2013" : time.format(e.at())).append("</td><td class=\"num\">")
                .append(Numbers.count(e.iter())).append("</td><td class=\"sev\"><span style=\"color:")
                .append(Palette.severityColour(sev)).append("\">").append(Palette.severityGlyph(sev))
                .append("</span> ").append(Html.text(sev)).append("</td><td>");
        String what;
        String detail;
        String remedy = "";
        switch (e.type()) {
            case "detection" -> {
                String who = e.equations().isEmpty() ? e.monitor() : String.join(", ", e.equations());
                what = e.pattern() + " \u00b7 " + e.state() + (who == null || who.isBlank() ? "" : " \u00b7 " + who);
                detail = nz(e.text("summary"));
                remedy = nz(e.text("remedy"));
            }
            case "notice" -> {
                what = "notice \u00b7 " + e.state() + " \u00b7 " + nz(e.text("channel"));
                detail = "about " + nz(e.pattern()) + (e.fields().has("attempt") ? ", attempt "
                        + e.fields().path("attempt").asText() : "")
                        + (e.text("error") == null ? "" : ": " + e.text("error"));
            }
            case "action" -> {
                what = "action \u00b7 " + e.state() + " \u00b7 " + nz(e.text("method"))
                        + (e.text("signal") == null ? "" : " " + e.text("signal"));
                detail = nz(e.text("reason")) + (e.text("error") == null ? "" : "; error: " + e.text("error"))
                        + (e.text("core_hours_note") == null ? "" : "; " + e.text("core_hours_note"));
            }
            default -> {
                what = e.type() + " \u00b7 " + e.state();
                detail = nz(e.text("reason"));
            }
        }
        out.append(Html.text(what)).append("</td><td>").append(Html.text(detail));
        String ev = evidence(e.evidence());
        if (!ev.isEmpty()) {
            out.append("<div class=\"ev\">").append(Html.text(ev)).append("</div>");
        }
        out.append("</td><td>").append(Html.text(remedy)).append("</td></tr>\n");
    }

    private static String nz(String s) {
        return s == null ? "" : s;
    }

    /** Evidence as {@code key = value} pairs, cut at a readable length. */
    static String evidence(JsonNode ev) {
        if (ev == null || !ev.isObject() || ev.size() == 0) {
            return "";
        }
        StringBuilder b = new StringBuilder();
        for (Iterator<Map.Entry<String, JsonNode>> it = ev.fields(); it.hasNext();) {
            Map.Entry<String, JsonNode> m = it.next();
            JsonNode v = m.getValue();
            String s = v.isNumber() ? Numbers.show(v.asDouble()) : v.isValueNode() ? v.asText() : v.toString();
            if (b.length() > 0) {
                b.append(", ");
            }
            b.append(m.getKey()).append(" = ").append(s);
            if (b.length() > 360) {
                b.setLength(360);
                b.append(" \u2026");
                break;
            }
        }
        return b.toString();
    }
}
