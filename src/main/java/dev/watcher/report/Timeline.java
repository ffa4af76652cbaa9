package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.BufferedReader;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Instant;
import java.time.format.DateTimeParseException;
import java.util.ArrayList;
import java.util.HashMap;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.TreeMap;

/**
 * The event timeline read for the report: events grouped by run in file order. A line that is not a JSON
 * object (an unterminated last line, a stray edit) is counted and skipped.
 *
 * <p>Memory stays bounded for huge timelines: past {@link #ROUTINE_KEPT} routine events of a run (level
 * crossings, notices queued or sent: events no verdict, span or band depends on) further ones are only
 * counted, by kind, in {@code skipped}.
 *
 * @param skipped per run, routine events counted but not kept, by kind ("detection info (residual-level)")
 */
record Timeline(Map<String, List<Event>> runs, long unreadable, Map<String, Map<String, Long>> skipped) {

    /** Routine events kept per run; the event table shows at most {@link Page#MAX_ROWS} rows anyway. */
    static final int ROUTINE_KEPT = 5000;

    private static final ObjectMapper JSON = new ObjectMapper();

    /** Events no verdict, span or band depends on. */
    static boolean routine(Event e) {
        return (e.is("detection") && e.state().equals("info"))
                || (e.is("notice") && (e.state().equals("queued") || e.state().equals("sent")));
    }

    /** How the event table's note names an event's kind. */
    static String kind(Event e) {
        return e.type() + " " + e.state() + (e.pattern() != null && e.is("detection") ? " (" + e.pattern() + ")" : "");
    }

    static Timeline read(Path file) throws IOException {
        Map<String, List<Event>> runs = new LinkedHashMap<>();
        Map<String, Map<String, Long>> skipped = new LinkedHashMap<>();
        Map<String, Integer> routine = new HashMap<>();
        long bad = 0;
        if (!Files.exists(file)) {
            return new Timeline(runs, 0, skipped);
        }
        try (BufferedReader r = Files.newBufferedReader(file, StandardCharsets.UTF_8)) {
            String line;
            while ((line = r.readLine()) != null) {
                if (line.isBlank()) {
                    continue;
                }
                Event e = parse(line);
                if (e == null) {
                    bad++;
                } else if (routine(e) && routine.merge(e.run(), 1, Integer::sum) > ROUTINE_KEPT) {
                    skipped.computeIfAbsent(e.run(), k -> new TreeMap<>()).merge(kind(e), 1L, Long::sum);
                } else {
                    runs.computeIfAbsent(e.run(), k -> new ArrayList<>()).add(e);
                }
            }
        }
        return new Timeline(runs, bad, skipped);
    }

    /** One line, or null when it is not an event. */
    static Event parse(String line) {
        JsonNode n;
        try {
            n = JSON.readTree(line);
        } catch (IOException e) {
            return null;
        }
        if (n == null || !n.isObject() || !n.hasNonNull("type")) {
            return null;
        }
        return new Event(n.path("seq").asLong(), n.path("run").asText(""), n.path("type").asText(), at(n.get("at")),
                n.path("iter").asLong(), n.path("state").asText(""), n.path("severity").asText("info"), n);
    }

    private static Instant at(JsonNode n) {
        if (n == null || n.isNull()) {
            return null;
        }
        if (n.isNumber()) {
            return Instant.ofEpochMilli(n.asLong());
        }
        try {
            return Instant.parse(n.asText());
        } catch (DateTimeParseException e) {
            return null;
        }
    }
}
