package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The one-line judgement at the top of a run's section, drawn from its timeline events alone (and the saved
 * run state for the last iteration seen). The wording never calls a run "safe": a converged verdict says
 * the run meets the configured criteria, nothing more.
 *
 * <p>Precedence, first that applies: a stop that was carried out (or requested) on the job; non-finite values
 * still open (the run blew up); a {@code converged} detection still open; an {@code ended} run event; else the
 * run is still running (or its watcher stopped without an end event).
 *
 * @param kind what happened
 * @param iter the iteration the verdict refers to
 * @param text the sentence shown, plain text (escaped when written)
 */
record Verdict(Kind kind, long iter, String text) {

    enum Kind {
        CONVERGED("converged"), STOPPED("stopped"), BLEW_UP("blew up"), ENDED("ended"), RUNNING("still running"),
        NO_DATA("no data");

        private final String label;

        Kind(String label) {
            this.label = label;
        }

        String label() {
            return label;
        }
    }

    static Verdict of(List<Event> events, JsonNode runState) {
        long lastIter = runState == null ? 0 : runState.path("last_iter").asLong(0);
        for (Event e : events) {
            lastIter = Math.max(lastIter, e.iter());
        }
        if (events.isEmpty()) {
            return runState == null || runState.isMissingNode()
                    ? new Verdict(Kind.NO_DATA, 0, "no events recorded for this run")
                    : new Verdict(Kind.RUNNING, lastIter, "no events recorded yet; last seen at iteration "
                            + lastIter);
        }
        Map<String, Event> open = openAtEnd(events);
        Event stop = null;
        boolean stopDone = false;
        Event endedEvent = null;
        for (Event e : events) {
            if (e.is("action")) {
                switch (e.state()) {
                    case "done", "signalled" -> {
                        stop = e;
                        stopDone = true;
                    }
                    case "requested" -> {
                        if (!stopDone) {
                            stop = e;
                        }
                    }
                    default -> {
                    }
                }
            } else if (e.is("run")) {
                if (e.state().equals("ended")) {
                    endedEvent = e;
                } else if (e.state().equals("started") || e.state().equals("resumed")) {
                    endedEvent = null;
                }
            }
        }
        if (stop != null) {
            String why = firstNonBlank(stop.text("reason"), stop.pattern(), "a stop rule matched");
            String tail = stopDone ? "" : " (stop requested; no confirmation in the timeline)";
            return new Verdict(Kind.STOPPED, stop.iter(), "stopped at iteration " + stop.iter() + " because " + why
                    + tail);
        }
        Event nonFinite = null;
        Event converged = null;
        for (Event e : open.values()) {
            if ("non-finite".equals(e.pattern())) {
                nonFinite = e;
            } else if ("converged".equals(e.pattern())) {
                converged = e;
            }
        }
        if (nonFinite != null) {
            String what = nonFinite.equations().isEmpty() ? nonFinite.monitor() : String.join(", ",
                    nonFinite.equations());
            return new Verdict(Kind.BLEW_UP, nonFinite.iter(), "blew up at iteration " + nonFinite.iter()
                    + ": non-finite values" + (what == null || what.isBlank() ? "" : " in " + what)
                    + (endedEvent != null ? "; the run ended at iteration " + endedEvent.iter() : ""));
        }
        if (converged != null) {
            boolean residualsOnly = "residuals-only".equals(converged.evidence().path("basis").asText());
            String basis = residualsOnly ? " (residuals only: the log has no monitors)" : "";
            String after = endedEvent != null ? "; the run ended at iteration " + endedEvent.iter()
                    : lastIter > converged.iter() ? "; still running, last seen at iteration " + lastIter : "";
            return new Verdict(Kind.CONVERGED, converged.iter(), "converged at iteration " + converged.iter()
                    + " \u2014 meets the configured criteria" + basis + after);
        }
        String still = stillOpen(open);
        if (endedEvent != null) {
            String reason = endedEvent.text("reason");
            return new Verdict(Kind.ENDED, endedEvent.iter(), "ended at iteration " + endedEvent.iter()
                    + (reason == null || reason.isBlank() ? "" : " (" + reason + ")")
                    + " without meeting the configured criteria" + still);
        }
        return new Verdict(Kind.RUNNING, lastIter, "still running: last seen at iteration " + lastIter
                + ", not yet meeting the configured criteria" + still);
    }

    /** The detections open at the end of the events (opened and not resolved since), by condition. */
    static Map<String, Event> openAtEnd(List<Event> events) {
        Map<String, Event> open = new LinkedHashMap<>();
        for (Event e : events) {
            if (e.is("detection")) {
                if (e.state().equals("open")) {
                    open.put(e.conditionKey(), e);
                } else if (e.state().equals("resolved")) {
                    open.remove(e.conditionKey());
                }
            }
        }
        return open;
    }

    private static String stillOpen(Map<String, Event> open) {
        List<String> parts = new ArrayList<>();
        for (Event e : open.values()) {
            if (!e.severity().equals("info")) {
                String who = e.equations().isEmpty() ? e.monitor() : String.join(", ", e.equations());
                parts.add(e.pattern() + (who == null || who.isBlank() ? "" : " (" + who + ")"));
            }
        }
        return parts.isEmpty() ? "" : "; still open: " + String.join("; ", parts);
    }

    private static String firstNonBlank(String... s) {
        for (String x : s) {
            if (x != null && !x.isBlank()) {
                return x;
            }
        }
        return "";
    }

    /** The CSS class of the verdict's banner. */
    String cssClass() {
        return "v-" + kind.name().toLowerCase(java.util.Locale.ROOT).replace('_', '-');
    }
}
