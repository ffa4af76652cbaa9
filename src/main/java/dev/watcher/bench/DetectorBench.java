package dev.watcher.bench;

import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detector;
import dev.watcher.detect.Detectors;
import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.LineParser;
import dev.watcher.model.Malformed;
import dev.watcher.model.ParseSink;
import dev.watcher.parse.Formats;
import dev.watcher.tail.LineHandler;
import dev.watcher.tail.LogReader;
import dev.watcher.tail.TailNotice;
import dev.watcher.tail.TailOptions;
import java.io.IOException;
import java.lang.management.ManagementFactory;
import java.lang.management.ThreadMXBean;
import java.nio.file.Path;
import java.util.List;
import java.util.Locale;
import java.util.function.Consumer;

/**
 * The per-record cost of each standard detector over a whitespace table: reads and parses the file as
 * {@code replay --format table} does, and hands every record to every detector of
 * {@link Detectors#standard}, timing each detector's {@code observe} with {@link System#nanoTime()} (here in
 * the harness only, never in production code). Prints one line per detector in nanoseconds per record, and
 * the parse cost per record by thread CPU time.
 *
 * <p>Usage: {@code DetectorBench FILE [Word,...]} (with words: only the detectors whose class name contains
 * one, e.g. {@code NonFinite,ResidualLevel} for the parse plus the first detectors). The figures are a measurement, never a test; the timer's own cost
 * (some tens of nanoseconds per call) is included in each detector's figure.
 */
public final class DetectorBench {

    private DetectorBench() {
    }

    public static void main(String[] args) throws IOException {
        if (args.length < 1) {
            System.err.println("usage: DetectorBench FILE [Word,...]");
            System.exit(2);
        }
        Path file = Path.of(args[0]);
        List<Detector> detectors = new java.util.ArrayList<>(Detectors.standard(DetectSettings.defaults()));
        if (args.length > 1) {
            // only the detectors whose class name contains one of the given words
            List<String> words = List.of(args[1].split(","));
            detectors.removeIf(d -> words.stream().noneMatch(d.getClass().getSimpleName()::contains));
        }
        int n = detectors.size();
        long[] nanos = new long[n];
        long[] detections = new long[n];
        long[] records = new long[1];
        long[] malformed = new long[1];
        @SuppressWarnings("unchecked")
        Consumer<Detection>[] outs = new Consumer[n];
        for (int k = 0; k < n; k++) {
            int idx = k;
            outs[k] = d -> detections[idx]++;
        }
        ParseSink sink = new ParseSink() {
            @Override
            public void record(IterationRecord r) {
                records[0]++;
                for (int k = 0; k < n; k++) {
                    long t0 = System.nanoTime();
                    detectors.get(k).observe(r, outs[k]);
                    nanos[k] += System.nanoTime() - t0;
                }
            }

            @Override
            public void segment(int segment, long line, String reason) {
                for (int k = 0; k < n; k++) {
                    detectors.get(k).segment(segment, line, outs[k]);
                }
            }

            @Override
            public void malformed(Malformed kind, long line, String detail) {
                malformed[0]++;
            }
        };
        LineParser parser = Formats.builtIn("table").newParser();
        ThreadMXBean threads = ManagementFactory.getThreadMXBean();
        long cpu0 = threads.getCurrentThreadCpuTime();
        long wall0 = System.nanoTime();
        LogReader.readAll(file, new LineHandler() {
            @Override
            public void line(CharSequence line, long lineNo) {
                parser.accept(line, lineNo, sink);
            }

            @Override
            public void notice(TailNotice notice) {
                malformed[0]++;
            }
        }, TailOptions.DEFAULTS);
        parser.flush(sink);
        long cpu = threads.getCurrentThreadCpuTime() - cpu0;
        long wall = System.nanoTime() - wall0;
        long detect = 0;
        for (long t : nanos) {
            detect += t;
        }
        long recs = Math.max(1, records[0]);
        // On a busy machine the thread is preempted inside the timed calls too: the per-detector wall figures
        // are scaled by the loop's thread CPU / wall ratio, which spreads the preemption evenly.
        double toCpu = wall > 0 ? Math.min(1.0, cpu / (double) wall) : 1.0;
        System.out.printf(Locale.ROOT, "detector cost records=%d malformed=%d (ns per record per detector, timer"
                + " included; cpu = wall x %.2f, the loop's cpu/wall ratio)%n", records[0], malformed[0], toCpu);
        for (int k = 0; k < n; k++) {
            System.out.printf(Locale.ROOT, "  %-30s %9.1f ns/record cpu %9.1f wall  %d detections%n",
                    detectors.get(k).getClass().getSimpleName(), nanos[k] * toCpu / recs, nanos[k] / (double) recs,
                    detections[k]);
        }
        System.out.printf(Locale.ROOT, "  %-30s %9.1f ns/record cpu %9.1f wall%n", "all detectors",
                detect * toCpu / recs, detect / (double) recs);
        System.out.printf(Locale.ROOT, "  %-30s %9.1f ns/record cpu (thread cpu %.2f s, wall %.2f s in all)%n",
                "read+parse+harness", Math.max(0, cpu - detect * toCpu) / recs, cpu / 1e9, wall / 1e9);
    }
}
