package dev.watcher.report;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.AtomicMoveNotSupportedException;
import java.nio.file.DirectoryStream;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.StandardCopyOption;
import java.time.Instant;
import java.time.ZoneId;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/**
 * The morning review: one self-contained HTML file (plotting library, styles and data inlined; it makes no
 * network request) for every run of a state directory or timeline.
 *
 * <p>Reads, never writes, the state directory: {@code timeline.jsonl} (the events), {@code history/RUN.json}
 * (the bounded series history, for the plots) and {@code runs/RUN.json} (counters and the detectors' last
 * forecasts). Given a timeline file, it looks for {@code history/} and {@code runs/} beside it; without
 * history the report holds the events only and says so. The file stays small whatever the run's length:
 * the history is bounded and the event table is capped (with a note of what was left out).
 *
 * <p>Called by the {@code report} command and at the end of the demo; stateless and thread-safe.
 */
public final class ReportWriter {

    private static final String UPLOT = "META-INF/resources/webjars/uplot/1.6.30/dist/";
    private static final ObjectMapper JSON = new ObjectMapper();

    private ReportWriter() {
    }

    /**
     * Writes the report for {@code stateDirOrTimeline} to {@code out} (atomically: a reader never sees half a
     * report), with times shown in {@code zone}, and returns {@code out}.
     *
     * @throws NoSuchFileException when {@code stateDirOrTimeline} does not exist, or is a directory holding
     *                             neither a timeline nor a history
     */
    public static Path write(Path stateDirOrTimeline, Path out, ZoneId zone) throws IOException {
        String html = render(stateDirOrTimeline, zone, Instant.now());
        Path abs = out.toAbsolutePath();
        if (abs.getParent() != null) {
            Files.createDirectories(abs.getParent());
        }
        Path tmp = abs.resolveSibling(abs.getFileName() + ".tmp");
        Files.writeString(tmp, html, StandardCharsets.UTF_8);
        try {
            Files.move(tmp, abs, StandardCopyOption.REPLACE_EXISTING, StandardCopyOption.ATOMIC_MOVE);
        } catch (AtomicMoveNotSupportedException e) {
            Files.move(tmp, abs, StandardCopyOption.REPLACE_EXISTING);
        }
        return out;
    }

    /** The page's HTML. */
    static String render(Path input, ZoneId zone, Instant now) throws IOException {
        if (!Files.exists(input)) {
            throw new NoSuchFileException(input.toString(), null, "no such state directory or timeline file");
        }
        Path dir;
        Path timeline;
        if (Files.isDirectory(input)) {
            dir = input;
            timeline = input.resolve("timeline.jsonl");
            if (!Files.exists(timeline) && !Files.isDirectory(input.resolve("history"))) {
                throw new NoSuchFileException(input.toString(), null,
                        "neither timeline.jsonl nor history/ is in this directory");
            }
        } else {
            timeline = input;
            Path parent = input.toAbsolutePath().getParent();
            dir = parent == null ? Path.of(".") : parent;
        }
        Timeline t = Timeline.read(timeline);
        Map<String, History> histories = histories(dir.resolve("history"));
        List<String> names = new ArrayList<>(t.runs().keySet());
        for (History h : histories.values()) {
            if (!names.contains(h.run())) {
                names.add(h.run());
            }
        }
        List<RunData> runs = new ArrayList<>();
        for (String name : names) {
            History h = histories.get(name);
            JsonNode state = runState(dir.resolve("runs").resolve(safe(name) + ".json"));
            runs.add(new RunData(name, t.runs().getOrDefault(name, List.of()), h, state, t.skipped().get(name)));
        }
        Page page = new Page(zone);
        return page.render(input.toString(), runs, t.unreadable(), !histories.isEmpty(), resource(
                "dev/watcher/report/report.css"), resource(UPLOT + "uPlot.min.css"), resource(UPLOT
                        + "uPlot.iife.min.js"), resource("dev/watcher/report/report.js"), now);
    }

    private static Map<String, History> histories(Path dir) throws IOException {
        Map<String, History> out = new LinkedHashMap<>();
        if (!Files.isDirectory(dir)) {
            return out;
        }
        List<Path> files = new ArrayList<>();
        try (DirectoryStream<Path> ds = Files.newDirectoryStream(dir, "*.json")) {
            ds.forEach(files::add);
        }
        files.sort(null);
        for (Path f : files) {
            try {
                History h = History.read(f);
                out.put(h.run(), h);
            } catch (IOException e) {
                // a history we cannot read leaves that run events-only; the report is still written
            }
        }
        return out;
    }

    private static JsonNode runState(Path file) {
        if (!Files.exists(file)) {
            return null;
        }
        try {
            return JSON.readTree(file.toFile());
        } catch (IOException e) {
            return null;
        }
    }

    /** A run name as the state directory names its files (letters, digits, {@code . _ -}; others '_'). */
    static String safe(String run) {
        return run.replaceAll("[^A-Za-z0-9._-]", "_");
    }

    private static String resource(String name) throws IOException {
        try (InputStream in = ReportWriter.class.getClassLoader().getResourceAsStream(name)) {
            if (in == null) {
                throw new IOException("missing resource on the class path: " + name);
            }
            return new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
    }
}
