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
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The event timeline read for the report: events grouped by run in file order. A line that is not a JSON
 * object (an unterminated last line, a stray edit) is counted and skipped.
 */
record Timeline(Map<String, List<Event>> runs, long unreadable) {

    private static final ObjectMapper JSON = new ObjectMapper();

    static Timeline read(Path file) throws IOException {
        Map<String, List<Event>> runs = new LinkedHashMap<>();
        long bad = 0;
        if (!Files.exists(file)) {
            return new Timeline(runs, 0);
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
                } else {
                    runs.computeIfAbsent(e.run(), k -> new ArrayList<>()).add(e);
                }
            }
        }
        return new Timeline(runs, bad);
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
