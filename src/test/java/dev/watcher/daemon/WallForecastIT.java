package dev.watcher.daemon;

import static org.awaitility.Awaitility.await;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import com.fasterxml.jackson.databind.JsonNode;
import com.fasterxml.jackson.databind.ObjectMapper;
import dev.watcher.demo.Histories;
import dev.watcher.demo.LogWriter;
import dev.watcher.model.IterationRecord;
import dev.watcher.parse.Formats;
import dev.watcher.report.ReportWriter;
import dev.watcher.rules.RulesLoader;
import dev.watcher.testing.MutableClock;
import java.io.OutputStream;
import java.io.PrintStream;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.Iterator;
import java.util.List;
import java.util.Map;
import java.util.concurrent.atomic.AtomicBoolean;
import java.util.stream.IntStream;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The wall-time forecast of a watched run, end to end: a thread writes the log of a real history (the project's
 * cavity solver, the converging run printing every second iteration) at a pace set on the daemon's injected clock,
 * the daemon follows it, and the run state file carries a {@code wall_forecast} whose rate is that pace and
 * whose seconds are the judge's iteration forecasts over that rate; the morning report shows both, and the live
 * view of the same daemon carries the same forecasts and the residual plot's level lines.
 */
class WallForecastIT {

    private static final ObjectMapper JSON = new ObjectMapper();
    /** Records the writer appends per second of the injected clock. */
    private static final int RECORDS_PER_SECOND = 2;
    /** The log prints every second iteration: the iteration counter advances 2 per record. */
    private static final int ITERATIONS_PER_RECORD = 2;
    private static final double PACE = RECORDS_PER_SECOND * ITERATIONS_PER_RECORD;

    @Test
    void theRunStateCarriesTheObservedRateAndTheForecastsInSeconds(@TempDir Path dir) throws Exception {
        List<IterationRecord> all = Histories.run("converging");
        List<IterationRecord> printed = IntStream.range(0, all.size()).filter(i -> (i + 1) % ITERATIONS_PER_RECORD == 0)
                .mapToObj(all::get).toList();
        assertEquals(ITERATIONS_PER_RECORD, printed.get(1).iter() - printed.get(0).iter());
        Path log = dir.resolve("intake.jsonl");
        Path state = dir.resolve("state");
        Iterator<IterationRecord> source = printed.iterator();
        // the history before the daemon starts: read at once while catching up, it must not count as a pace
        try (Writer w = Files.newBufferedWriter(log, StandardCharsets.UTF_8)) {
            LogWriter lw = new LogWriter(w, LogWriter.Layout.JSONL);
            for (int i = 0; i < 50; i++) { // iterations 2 to 100
                lw.write(source.next());
            }
        }
        MutableClock clock = new MutableClock(Instant.parse("2026-03-02T21:00:00Z"));
        DaemonConfig c = new DaemonConfig(
                List.of(new RunSpec("intake", List.of(log), List.of(Formats.builtIn("jsonl")))),
                RulesLoader.defaults(), Map.of(), List.of(), state, null, false, Map.of(), false, null, "127.0.0.1:0", null,
                false, Duration.ofMillis(50), Duration.ofMillis(200), Duration.ofMinutes(5), Duration.ofSeconds(2),
                new PrintStream(OutputStream.nullOutputStream()), true, clock);
        Daemon d = new Daemon(c);
        Thread t = new Thread(() -> {
            try {
                d.run();
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        });
        AtomicBoolean stop = new AtomicBoolean();
        Thread writer = new Thread(() -> {
            try (Writer w = Files.newBufferedWriter(log, StandardCharsets.UTF_8, StandardOpenOption.APPEND)) {
                LogWriter lw = new LogWriter(w, LogWriter.Layout.JSONL); // flushes every line
                while (!stop.get() && source.hasNext()) {
                    for (int i = 0; i < RECORDS_PER_SECOND && source.hasNext(); i++) {
                        lw.write(source.next());
                    }
                    clock.advance(Duration.ofSeconds(1));
                    Thread.sleep(80);
                }
            } catch (Exception e) {
                throw new IllegalStateException(e);
            }
        });
        t.start();
        Path rs = state.resolve("runs/intake.json");
        JsonNode saved;
        JsonNode stable;
        JsonNode live;
        JsonNode levels;
        try {
            Path tl = state.resolve("timeline.jsonl");
            await().atMost(Duration.ofSeconds(30)).until(() -> Files.exists(tl)
                    && Files.readString(tl).contains("caught-up"));
            writer.start();
            // the rate window is two minutes of the clock: wait until it spans at least 100 s of it
            await().atMost(Duration.ofSeconds(60)).until(() -> Files.exists(rs)
                    && JSON.readTree(rs.toFile()).path("wall_forecast").path("rate_seconds").asDouble() >= 100);
            saved = JSON.readTree(rs.toFile());
            // the writer stops, and with it the clock: no save follows the last one, which the live view shows
            stop.set(true);
            writer.join(30_000);
            String[] last = {""};
            await().atMost(Duration.ofSeconds(30)).pollDelay(Duration.ofMillis(700)).pollInterval(Duration.ofMillis(700))
                    .until(() -> {
                        String now = Files.readString(rs);
                        boolean same = now.equals(last[0]);
                        last[0] = now;
                        return same;
                    });
            String started = Files.readAllLines(tl).stream().filter(l -> l.contains("live view at ")).findFirst()
                    .orElseThrow();
            String reason = JSON.readTree(started).get("reason").asText();
            String base = reason.substring(reason.indexOf("live view at ") + "live view at ".length()).strip();
            java.net.http.HttpClient http = java.net.http.HttpClient.newHttpClient();
            stable = JSON.readTree(rs.toFile());
            live = JSON.readTree(http.send(java.net.http.HttpRequest.newBuilder(java.net.URI.create(base + "api/runs"))
                    .build(), java.net.http.HttpResponse.BodyHandlers.ofString()).body()).get(0).path("forecast");
            levels = JSON.readTree(http.send(java.net.http.HttpRequest.newBuilder(java.net.URI.create(base
                    + "api/plots?run=intake")).build(), java.net.http.HttpResponse.BodyHandlers.ofString()).body())
                    .path("residualLevels");
            assertEquals(last[0], Files.readString(rs), "no save while the live view was read");
        } finally {
            stop.set(true);
            writer.join(30_000);
            d.shutdown("test over");
            t.join(30_000);
        }
        assertTrue(!t.isAlive());

        JsonNode wall = saved.get("wall_forecast");
        double rate = wall.get("iterations_per_second").asDouble();
        double span = wall.get("rate_seconds").asDouble();
        // Each end of the window may be off the pace by one batch (the daemon reads a batch half written): 4
        // iterations per end, plus 4 per second of the clock the writer moves on between the daemon's reading
        // of the file and of the clock (one batch per 80 ms of real time). Over >= 100 s (>= 400 iterations)
        // 10 % allows 4 such seconds per end: a stall of over 300 ms within one poll. Counting records instead
        // of iterations would give 2 per second, counting the history read at catch-up far more.
        assertTrue(span >= 100, wall.toString());
        assertEquals(PACE, rate, 0.1 * PACE, wall.toString());

        JsonNode eqs = saved.path("snapshot").path("ConvergedDetector").path("equations");
        JsonNode per = wall.get("equations");
        assertEquals(eqs.size(), per.size(), per.toString());
        int converging = 0;
        for (Iterator<Map.Entry<String, JsonNode>> it = eqs.fields(); it.hasNext();) {
            Map.Entry<String, JsonNode> e = it.next();
            JsonNode f = e.getValue();
            JsonNode w = per.get(e.getKey());
            assertEquals(f.get("forecast").asText(), w.get("forecast").asText(), e.getKey());
            if (f.get("forecast").asText().equals("converging")) {
                converging++;
                for (String k : new String[] {"", "_low", "_high"}) {
                    double iterations = f.get("iterations" + k).asDouble();
                    // the seconds are whole: within half a second of iterations / rate
                    assertEquals(iterations / rate, w.get("seconds" + k).asDouble(), 0.5, e.getKey() + k + " " + w);
                }
            } else if (!f.get("forecast").asText().equals("reached")) {
                assertTrue(!w.has("seconds"), w.toString());
            }
        }
        assertTrue(converging > 0, "the energy residual of the converging run reaches 1e-5 near 720: " + eqs);

        liveCarriesTheSave(stable, live, levels);

        // the morning report shows the rate and the wall times of the final save
        JsonNode last = JSON.readTree(rs.toFile());
        String html = Files.readString(ReportWriter.write(state, dir.resolve("report.html"), ZoneOffset.UTC));
        double lastRate = last.get("wall_forecast").get("iterations_per_second").asDouble();
        assertTrue(html.contains("iteration rate (last save)"), "rate in the run's facts");
        assertTrue(html.contains("Wall time to target (range)"), "wall-time column");
        assertTrue(html.contains(formatted(lastRate) + " per second"), "rate " + lastRate + " shown");
        for (Iterator<Map.Entry<String, JsonNode>> it = last.path("wall_forecast").path("equations").fields();
                it.hasNext();) {
            Map.Entry<String, JsonNode> e = it.next();
            int at = html.indexOf("<tr><td>" + e.getKey() + "</td>");
            assertTrue(at > 0, e.getKey() + " row");
            String[] cells = html.substring(at, html.indexOf("</tr>", at)).split("</td>");
            // equation, residual, target, forecast, iterations, wall time, slope
            assertEquals(7, cells.length, html.substring(at, html.indexOf("</tr>", at)));
            String cell = cells[5].substring(cells[5].lastIndexOf('>') + 1);
            assertEquals(e.getValue().has("seconds"), !cell.equals("\u2013"), e.getKey() + ": " + cell);
        }
    }

    /**
     * The live view's forecasts against the run state file of the same save: the rate, each equation's
     * status, target, iterations and seconds, each monitor's predicted final value and remaining error (the
     * converged judge's where it has one, else the monitor-settled judgement's, as the report merges them), and
     * the residual plot's level lines at 1e-3 and at the target the judge used.
     */
    private static void liveCarriesTheSave(JsonNode state, JsonNode live, JsonNode levels) {
        JsonNode wall = state.path("wall_forecast");
        JsonNode judge = state.path("snapshot").path("ConvergedDetector");
        assertEquals(wall.get("iterations_per_second").asDouble(), live.path("iterations_per_second").asDouble(),
                live.toString());
        assertEquals(wall.get("rate_seconds").asDouble(), live.path("rate_seconds").asDouble());
        assertEquals(judge.path("verdict").asText(), live.path("verdict").asText());
        JsonNode eqs = judge.path("equations");
        assertEquals(eqs.size(), live.path("equations").size(), live.toString());
        int i = 0;
        for (Iterator<Map.Entry<String, JsonNode>> it = eqs.fields(); it.hasNext(); i++) {
            Map.Entry<String, JsonNode> e = it.next();
            JsonNode f = e.getValue();
            JsonNode row = live.path("equations").get(i);
            assertEquals(e.getKey(), row.path("name").asText());
            assertEquals(f.path("forecast").asText(), row.path("status").asText(), e.getKey());
            assertEquals(f.path("target").asDouble(), row.path("target").asDouble(), e.getKey());
            for (String k : new String[] {"iterations", "iterations_low", "iterations_high"}) {
                assertEquals(f.has(k), row.has(k), e.getKey() + " " + k);
                assertEquals(f.path(k).asDouble(), row.path(k).asDouble(), e.getKey() + " " + k);
            }
            JsonNode w = wall.path("equations").path(e.getKey());
            for (String k : new String[] {"seconds", "seconds_low", "seconds_high"}) {
                assertEquals(w.has(k), row.has(k), e.getKey() + " " + k);
                assertEquals(w.path(k).asDouble(), row.path(k).asDouble(), e.getKey() + " " + k);
            }
        }
        Map<String, JsonNode> monitors = new java.util.LinkedHashMap<>();
        state.path("snapshot").path("MonitorSettledDetector").path("monitors").fields()
                .forEachRemaining(e -> monitors.put(e.getKey(), e.getValue()));
        judge.path("monitors").fields().forEachRemaining(e -> monitors.put(e.getKey(), e.getValue()));
        assertEquals(monitors.size(), live.path("monitors").size(), live.toString());
        assertTrue(!monitors.isEmpty(), "the cavity's monitors were judged: " + state.path("snapshot"));
        for (JsonNode m : live.path("monitors")) {
            JsonNode own = monitors.get(m.path("name").asText());
            assertEquals(own.path("state").asText(), m.path("state").asText(), m.toString());
            assertEquals(own.path("predicted_final").asDouble(), m.path("predicted_final").asDouble(), m.toString());
            assertEquals(own.path("remaining_error").asDouble(), m.path("remaining_error").asDouble(), m.toString());
        }
        assertEquals(2, levels.size(), levels.toString());
        assertEquals(1e-3, levels.get(0).path("value").asDouble(), "1e-3: loose (common practice, no published source)");
        assertEquals(eqs.elements().next().path("target").asDouble(), levels.get(1).path("value").asDouble(),
                "the judge's target: " + levels);
    }

    /** The rate as the report prints it (four significant digits, no trailing zeros). */
    private static String formatted(double v) {
        return new java.math.BigDecimal(v).round(new java.math.MathContext(4)).stripTrailingZeros().toPlainString();
    }
}
