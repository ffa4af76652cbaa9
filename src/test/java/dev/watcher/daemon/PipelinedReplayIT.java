package dev.watcher.daemon;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTimeoutPreemptively;
import static org.junit.jupiter.api.Assertions.assertTrue;

import dev.watcher.cli.Main;
import dev.watcher.journal.Journal;
import dev.watcher.model.InputFileException;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Malformed;
import dev.watcher.model.Notice;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.StopRequest;
import dev.watcher.model.TimelineEvent;
import dev.watcher.parse.FormatSpec;
import dev.watcher.parse.Formats;
import dev.watcher.rules.RulesLoader;
import dev.watcher.tail.LineHandler;
import dev.watcher.tail.LogReader;
import dev.watcher.tail.TailNotice;
import dev.watcher.tail.TailOptions;
import java.io.ByteArrayOutputStream;
import java.io.IOException;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.time.Instant;
import java.time.ZoneOffset;
import java.util.ArrayList;
import java.util.List;
import java.util.Map;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * Replay reads and parses on a reader thread and runs the detectors, rules and outputs on its own, handing
 * over in batches ({@link ReadAhead}). The reference here is the single-threaded path ({@link RunPipeline#line}
 * fed straight by the reader): whatever the batch size, the pipelined path must give the same records,
 * segment markers, malformed-line reports and timeline events in the same order. The log is the project's
 * own solver run with a restart (test-logs/quirk-restart.table.log, see test-logs/README.md) with bad lines
 * of several kinds put between its rows.
 */
class PipelinedReplayIT {

    private static final Clock CLOCK = Clock.fixed(Instant.parse("2026-12-01T02:13:07Z"), ZoneOffset.UTC);
    private static final Path LOG = Path.of("test-logs", "quirk-restart.table.log");
    private static final Path TABLE_FORMAT = Path.of("test-logs", "formats", "table.yaml");

    /** The log with bad lines put in, and the malformed reports they must give, in file order. */
    private record Garbled(Path file, List<String> expectedBad) {
    }

    /**
     * Every 89th line of the original log is followed by a bad line, cycling through a number that is not
     * one, a row missing its last column, binary bytes and a comment with truncated UTF-8.
     */
    private static Garbled garble(Path dir) throws IOException {
        List<String> lines = Files.readAllLines(LOG);
        ByteArrayOutputStream out = new ByteArrayOutputStream();
        List<String> expected = new ArrayList<>();
        long lineNo = 0;
        String lastRow = null;
        int kind = 0;
        for (int i = 0; i < lines.size(); i++) {
            String l = lines.get(i);
            out.writeBytes((l + "\n").getBytes(StandardCharsets.UTF_8));
            lineNo++;
            if (!l.startsWith("#")) {
                lastRow = l;
            }
            if (i % 89 != 88 || lastRow == null) {
                continue;
            }
            lineNo++;
            String[] f = lastRow.trim().split("\\s+");
            switch (kind++ % 4) {
                case 0 -> {
                    f[2] = "1.2.3e-4";
                    out.writeBytes((String.join("   ", f) + "\n").getBytes(StandardCharsets.US_ASCII));
                    expected.add(Malformed.BAD_NUMBER.id() + " " + lineNo);
                }
                case 1 -> {
                    String shortRow = String.join("   ", java.util.Arrays.copyOf(f, f.length - 1));
                    out.writeBytes((shortRow + "\n").getBytes(StandardCharsets.US_ASCII));
                    expected.add(Malformed.BAD_SHAPE.id() + " " + lineNo);
                }
                case 2 -> {
                    out.writeBytes(new byte[] {1, 2, 0, '7', 3, '\n'});
                    expected.add(Malformed.BINARY.id() + " " + lineNo);
                }
                default -> {
                    out.writeBytes(new byte[] {'#', ' ', 'n', 'o', 't', 'e', ' ', (byte) 0xe2, (byte) 0x82, '\n'});
                    expected.add(Malformed.BAD_UTF8.id() + " " + lineNo);
                }
            }
        }
        Path file = dir.resolve("restart-garbled.log");
        Files.write(file, out.toByteArray());
        return new Garbled(file, expected);
    }

    /** Everything the pipeline sends out, in order, as text. */
    private static final class Trace implements RunOutputs {
        final List<String> items = new ArrayList<>();
        int failAtRecord = -1;
        int records;

        @Override
        public void event(PendingEvent e) {
            // as the journal would write it, with seq 0 and the fixed clock
            String line = new String(Journal.encode(TimelineEvent.of(0, CLOCK.instant(), e)), StandardCharsets.UTF_8);
            items.add("event " + line.strip());
        }

        @Override
        public void notice(Notice n) {
            items.add("notice " + n);
        }

        @Override
        public void stop(StopRequest r) {
            items.add("stop " + r);
        }

        @Override
        public void record(IterationRecord r) {
            if (++records == failAtRecord) {
                throw new IllegalStateException("an output failed at record " + records);
            }
            items.add("record " + r.iter() + " line " + r.line() + " segment " + r.segment());
        }

        @Override
        public void segment(int segment, long iter) {
            items.add("segment " + segment + " at " + iter);
        }

        @Override
        public void malformed(Malformed kind, long line, String detail) {
            items.add("malformed " + kind.id() + " " + line);
        }
    }

    private static FormatSpec format(Path file) throws IOException, InputFileException {
        return Formats.load(file.toString(), Files.readString(file));
    }

    private static RunPipeline pipeline(RunSpec spec, Trace t) {
        RunPipeline p = Pipelines.build(spec, RulesLoader.defaults(), Map.of(), t, 1_000_000, CLOCK);
        p.decider().setCatchingUp(true); // as replay does
        return p;
    }

    /** The single-threaded reference: the reader feeds the pipeline on this thread. */
    private static Trace direct(RunSpec spec) throws IOException {
        Trace t = new Trace();
        RunPipeline p = pipeline(spec, t);
        for (int i = 0; i < spec.sources().size(); i++) {
            int source = i;
            LogReader.readAll(spec.sources().get(i), new LineHandler() {
                @Override
                public void line(CharSequence line, long lineNo) {
                    p.line(source, line, lineNo);
                }

                @Override
                public void notice(TailNotice n) {
                    Daemon.tailNotice(p, n);
                }
            }, TailOptions.DEFAULTS);
        }
        p.flush();
        t.items.add("counters " + p.counters().toMap());
        return t;
    }

    private static Trace pipelined(RunSpec spec, int batch) throws IOException {
        Trace t = new Trace();
        RunPipeline p = pipeline(spec, t);
        try (ReadAhead ahead = new ReadAhead(p, batch)) {
            for (int i = 0; i < spec.sources().size(); i++) {
                Path src = spec.sources().get(i);
                ahead.run(i, h -> LogReader.readAll(src, h, TailOptions.DEFAULTS));
            }
        }
        p.flush();
        t.items.add("counters " + p.counters().toMap());
        return t;
    }

    @Test
    void thePipelinedPathGivesTheSameItemsInTheSameOrderAsTheSingleThreadedOne(@TempDir Path dir) throws Exception {
        Garbled g = garble(dir);
        RunSpec spec = new RunSpec("restart", List.of(g.file()), List.of(format(TABLE_FORMAT)));
        Trace reference = direct(spec);

        // the reference itself: the bad lines reported at their line numbers, in file order, between the
        // records of the rows around them; the restart's segment; detections raised
        List<String> bad = reference.items.stream().filter(s -> s.startsWith("malformed "))
                .map(s -> s.substring("malformed ".length())).toList();
        assertEquals(g.expectedBad(), bad);
        long previous = 0;
        for (String s : reference.items) {
            if (s.startsWith("malformed ") || s.startsWith("record ")) {
                String[] w = s.split(" ");
                long line = Long.parseLong(s.startsWith("record ") ? w[3] : w[2]);
                assertTrue(line > previous, "out of file order: " + s + " after line " + previous);
                previous = line;
            }
        }
        assertTrue(reference.items.stream().anyMatch(s -> s.startsWith("segment 1 ")), "the restart's segment");
        assertTrue(reference.items.stream().anyMatch(s -> s.contains("\"type\":\"detection\"")), "detections");
        // detections of detectors on both sides of Detectors.SECOND_LANE_FROM, so the pipelined path below
        // compares the lane's hand-over too (residual-level runs on the run's thread, converged and
        // monitor-settled on the reader thread)
        for (String pattern : List.of("residual-level", "monitor-settled", "converged")) {
            assertTrue(reference.items.stream().anyMatch(s -> s.contains("\"pattern\":\"" + pattern + "\"")),
                    "a " + pattern + " detection");
        }

        for (int batch : new int[] {1, 2, 7, 64, ReadAhead.BATCH}) {
            assertSameItems(reference.items, pipelined(spec, batch).items, "batch " + batch);
        }
    }

    @Test
    void twoSourcesJoinedOnTheIterationGiveTheSameItemsPipelined(@TempDir Path dir) throws Exception {
        // the same run written as two files: the residual columns in one, the monitor columns in the other
        List<String> lines = Files.readAllLines(LOG);
        StringBuilder res = new StringBuilder();
        StringBuilder mon = new StringBuilder();
        for (String l : lines) {
            if (l.startsWith("# note") || l.startsWith("# restart")) {
                res.append(l).append('\n');
                continue;
            }
            String[] f = l.replace("#", " ").trim().split("\\s+");
            String head = l.startsWith("#") ? "# " : "  ";
            res.append(head).append(String.join("  ", java.util.Arrays.copyOfRange(f, 0, 5))).append('\n');
            mon.append(head).append(f[0]).append("  ").append(String.join("  ", java.util.Arrays.copyOfRange(f, 5, 8)))
                    .append('\n');
        }
        Path r = dir.resolve("restart.res.log");
        Path m = dir.resolve("restart.mon.log");
        Files.writeString(r, res);
        Files.writeString(m, mon);
        FormatSpec table = format(TABLE_FORMAT);
        RunSpec spec = new RunSpec("restart", List.of(r, m), List.of(table, table));
        Trace reference = direct(spec);
        assertTrue(reference.items.stream().anyMatch(s -> s.startsWith("record 1200 ")), "joined to the end");
        assertTrue(reference.items.stream().anyMatch(s -> s.contains("\"type\":\"detection\"")), "detections");
        // detections of detectors on both sides of Detectors.SECOND_LANE_FROM, so the pipelined path below
        // compares the lane's hand-over too (residual-level runs on the run's thread, converged and
        // monitor-settled on the reader thread)
        for (String pattern : List.of("residual-level", "monitor-settled", "converged")) {
            assertTrue(reference.items.stream().anyMatch(s -> s.contains("\"pattern\":\"" + pattern + "\"")),
                    "a " + pattern + " detection");
        }
        for (int batch : new int[] {1, 5, ReadAhead.BATCH}) {
            assertSameItems(reference.items, pipelined(spec, batch).items, "batch " + batch);
        }
    }

    @Test
    void aReadErrorComesAfterEverythingReadBeforeItAndTheReaderCanGoOn(@TempDir Path dir) throws Exception {
        Garbled g = garble(dir);
        RunSpec spec = new RunSpec("restart", List.of(g.file()), List.of(format(TABLE_FORMAT)));
        Trace t = new Trace();
        RunPipeline p = pipeline(spec, t);
        assertTimeoutPreemptively(Duration.ofSeconds(60), () -> {
            try (ReadAhead ahead = new ReadAhead(p, 3)) {
                IOException e = assertThrows(IOException.class, () -> ahead.run(0, h -> {
                    h.line("# pass cont mom-x mom-y temp vmid lid_shear wall_q", 1);
                    for (int i = 1; i <= 40; i++) {
                        h.line(i + " 1e-3 1e-3 1e-3 1e-3 0.2 0.1 0.03", i + 1);
                    }
                    throw new IOException("the disk went away");
                }));
                assertEquals("the disk went away", e.getMessage());
                assertEquals(40, p.counters().records(), "every record read before the error was applied");
                // the ring is whole again: the next read works
                ahead.run(0, h -> h.line("41 1e-3 1e-3 1e-3 1e-3 0.2 0.1 0.03", 42));
                assertEquals(41, p.counters().records());
            }
        });
    }

    @Test
    void aFailureOnTheRunsThreadStopsTheReaderWithoutHanging(@TempDir Path dir) throws Exception {
        Garbled g = garble(dir);
        RunSpec spec = new RunSpec("restart", List.of(g.file()), List.of(format(TABLE_FORMAT)));
        Trace t = new Trace();
        t.failAtRecord = 100;
        RunPipeline p = pipeline(spec, t);
        assertTimeoutPreemptively(Duration.ofSeconds(60), () -> {
            try (ReadAhead ahead = new ReadAhead(p, 4)) {
                IllegalStateException e = assertThrows(IllegalStateException.class,
                        () -> ahead.run(0, h -> LogReader.readAll(g.file(), h, TailOptions.DEFAULTS)));
                assertEquals("an output failed at record 100", e.getMessage());
                long recordsAtFailure = t.records;
                // the reader stopped early (it reads at most a few batches ahead), and can read again
                assertTrue(recordsAtFailure < 200, "records " + recordsAtFailure);
                t.failAtRecord = -1;
                ahead.run(0, h -> h.line("1201 1e-3 1e-3 1e-3 1e-3 0.2 0.1 0.03", 99_999));
                assertEquals(recordsAtFailure + 1, t.records);
            }
        });
    }

    /** Equal lists, or a failure naming the first item that differs (the lists are long). */
    private static void assertSameItems(List<String> expected, List<String> actual, String what) {
        int n = Math.min(expected.size(), actual.size());
        for (int i = 0; i < n; i++) {
            assertEquals(expected.get(i), actual.get(i), what + ": item " + i);
        }
        assertEquals(expected.size(), actual.size(), what + ": number of items");
    }

    /** The timeline without its wall-clock field ({@code at}): what must be the same byte for byte. */
    private static List<String> withoutClock(Path timeline) throws IOException {
        return Files.readAllLines(timeline).stream().map(PipelinedReplayIT::withoutClock).toList();
    }

    private static String withoutClock(String line) {
        return line.replaceFirst("\"at\":\"[^\"]*\",", "");
    }

    @Test
    void replayingTheSameLogTwiceGivesTheSameTimelineApartFromTheClock(@TempDir Path dir) throws Exception {
        Garbled g = garble(dir);
        for (String s : List.of("a", "b")) {
            assertEquals(0, Main.execute("replay", g.file().toString(), "--format", TABLE_FORMAT.toString(),
                    "--state", dir.resolve(s).toString(), "-q"));
        }
        List<String> a = withoutClock(dir.resolve("a/timeline.jsonl"));
        List<String> b = withoutClock(dir.resolve("b/timeline.jsonl"));
        assertTrue(a.size() > 3, "started, detections, ended: " + a);
        assertFalse(a.get(0).contains("\"at\""), a.get(0));
        assertEquals(a, b);
        // and its events between started and ended are the single-threaded reference's, byte for byte
        RunSpec spec = new RunSpec("restart-garbled", List.of(g.file()), List.of(format(TABLE_FORMAT)));
        List<String> reference = direct(spec).items.stream().filter(x -> x.startsWith("event "))
                .map(x -> withoutClock(x.substring("event ".length())).replaceFirst("\"seq\":0,", "")).toList();
        List<String> replayed = a.subList(1, a.size() - 1).stream().map(x -> x.replaceFirst("\"seq\":\\d+,", ""))
                .toList();
        assertTrue(a.get(0).contains("\"state\":\"started\"") && a.get(a.size() - 1).contains("\"state\":\"ended\""));
        assertEquals(reference, replayed);
    }
}
