package dev.watcher.bench;

import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detector;
import dev.watcher.detect.Detectors;
import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import java.util.function.Consumer;

/**
 * The detector share of the replay cost: builds the benchmark table's records in memory (the model of
 * {@link TableGen}: seven noisy decaying residuals and one monitor) and runs the standard detectors over
 * them one record at a time, printing nanoseconds of the thread's CPU time per record (each detector alone, then all together, the
 * generation subtracted) and how many detections of each kind were raised.
 * A measurement, not a test. Usage: {@code java -cp watcher.jar dev.watcher.bench.DetectBench [records [ClassNameWord,...]]}.
 */
public final class DetectBench {

    // thread CPU time, not elapsed time: the figures stay meaningful when other work shares the cores
    private static final java.lang.management.ThreadMXBean CPU = java.lang.management.ManagementFactory.getThreadMXBean();

    private DetectBench() {
    }

    public static void main(String[] args) {
        long n = args.length > 0 ? Long.parseLong(args[0]) : 3_000_000L;
        List<String> words = args.length > 1 ? List.of(args[1].split(",")) : List.of("");
        List<String> names = new ArrayList<>();
        for (Detector d : Detectors.standard(DetectSettings.defaults())) {
            String name = d.getClass().getSimpleName();
            if (words.stream().anyMatch(name::contains)) {
                names.add(name);
            }
        }
        // records are generated on the fly and passed through the detectors one at a time, as replay does;
        // the generation alone is timed first and subtracted. One untimed pass through every selected detector
        // first, so neither the generation nor any detector is timed while still being compiled (timed cold,
        // the generation came out slower than generation plus a detector, and the differences negative).
        pass(Math.min(n, 500_000), names, null);
        // each detector's pass is paired with a generation-only pass right before it, and that one is
        // subtracted: the speed of a shared VM drifts over the minute the whole bench takes
        double base = pass(n, List.of(), null);
        System.out.printf("%-32s %8.1f ns/record (generation, subtracted below)%n", "records", base);
        double sum = 0;
        for (String name : names) {
            double b = pass(n, List.of(), null);
            double t = pass(n, List.of(name), null) - b;
            sum += t;
            System.out.printf("%-32s %8.1f ns/record%n", name, t);
        }
        base = pass(n, List.of(), null);
        Map<String, Long> byPattern = new LinkedHashMap<>();
        double all = pass(n, names, byPattern) - base;
        System.out.printf("%-32s %8.1f ns/record together (%.1f as the sum of the single runs), %d records%n",
                "selected detectors", all, sum, n);
        byPattern.forEach((k, v) -> System.out.printf("  %-40s %d%n", k, v));
    }

    /** One pass over n generated records through the named detectors; nanoseconds per record. */
    private static double pass(long n, List<String> names, Map<String, Long> byPattern) {
        List<Detector> ds = new ArrayList<>();
        for (Detector d : Detectors.standard(DetectSettings.defaults())) {
            if (names.contains(d.getClass().getSimpleName())) {
                ds.add(d);
            }
        }
        Consumer<Detection> out = x -> {
            if (byPattern != null) {
                long seen = byPattern.merge(x.pattern() + " " + x.state().id(), 1L, Long::sum);
                if (seen <= 2) {
                    System.out.println("  e.g. " + x.iter() + " " + x.pattern() + " " + x.state().id() + " "
                            + x.equations() + " " + x.summary());
                }
            }
        };
        Generator g = new Generator(n);
        long sink = 0;
        long t0 = CPU.getCurrentThreadCpuTime();
        for (long i = 0; i < n; i++) {
            IterationRecord r = g.next();
            sink += r.iter();
            for (Detector d : ds) {
                d.observe(r, out);
            }
        }
        long t = CPU.getCurrentThreadCpuTime() - t0;
        if (sink == 42) {
            System.out.println();
        }
        return (double) t / n;
    }

    /** The record stream of {@link TableGen}, without the text. */
    private static final class Generator {
        private final SplittableRandom rnd = new SplittableRandom(20261201L);
        private final double[] start = {0.0, -0.3, -0.4, -1.0, -0.6, 0.2, -1.5};
        private final double[] drop = {5.2, 5.5, 5.4, 6.0, 4.8, 4.5, 5.0};
        private final double[] tauShare = {0.18, 0.15, 0.16, 0.25, 0.20, 0.22, 0.12};
        private final double[] noise = new double[7];
        private final List<String> residualNames = List.of("cont", "mom-x", "mom-y", "temp", "k", "omega", "vof");
        private final List<String> monitorNames = List.of("vmid");
        private final double span;
        private long i;

        Generator(long n) {
            span = Math.max(1, n);
        }

        IterationRecord next() {
            i++;
            double x = i / span;
            double[] v = new double[7];
            for (int j = 0; j < 7; j++) {
                noise[j] = 0.92 * noise[j] + 0.06 * rnd.nextGaussian();
                v[j] = Math.pow(10, start[j] - drop[j] * (1 - Math.exp(-x / tauShare[j]))
                        + 0.08 * Math.sin(i / (37.0 + 11 * j)) + noise[j]);
            }
            double vmid = 0.2134 + 0.06 * Math.exp(-x / 0.1) * Math.cos(i / 53.0) + 2e-4 * rnd.nextGaussian();
            return IterationRecord.steady(i, new Samples(residualNames, v), new Samples(monitorNames,
                    new double[] {vmid}));
        }
    }
}
