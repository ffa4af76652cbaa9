package dev.watcher.bench;

import dev.watcher.history.RunHistory;
import dev.watcher.journal.Journal;
import dev.watcher.journal.StateDir;
import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.EventType;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.PendingEvent;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import dev.watcher.report.ReportWriter;
import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Instant;
import java.time.ZoneId;
import java.time.ZoneOffset;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

/**
 * The report at scale, timed: generates the state directory of a long invented run (a steady heat-exchanger
 * header case: four residuals, two monitors, a temporary energy blow-up, a settled monitor, convergence) of
 * the given length, feeding every record through {@link RunHistory}, then writes the report and prints its
 * size and the time of each part. A measurement, never a test; the tests use {@link #generate} at a smaller
 * length.
 *
 * <p>Usage: {@code ReportBench [ITERATIONS] [DIR]} (defaults: 10 000 000, a temporary directory).
 */
public final class ReportBench {

    /** The kind of invented run {@link #generate} writes. */
    public enum Scenario {
        /** residuals fall seven decades with a temporary energy spike; a monitor settles; converged. */
        CONVERGING,
        /** momentum residuals turn up together and the job is stopped (core-hours saved). */
        STOPPED,
        /** an unsteady run: per-step peaks climb; a non-finite value at the end. */
        UNSTEADY
    }

    private ReportBench() {
    }

    /** A clock the generator moves by hand: one second per event. */
    private static final class HandClock extends Clock {
        private Instant now;

        HandClock(Instant start) {
            now = start;
        }

        void advance(long millis) {
            now = now.plusMillis(millis);
        }

        @Override
        public ZoneId getZone() {
            return ZoneOffset.UTC;
        }

        @Override
        public Clock withZone(ZoneId zone) {
            return this;
        }

        @Override
        public Instant instant() {
            return now;
        }
    }

    public static void main(String[] args) throws IOException {
        long n = args.length > 0 ? Long.parseLong(args[0].replace("_", "")) : 10_000_000L;
        Path dir = args.length > 1 ? Path.of(args[1]) : Files.createTempDirectory("watcher-report-bench");
        long t0 = System.nanoTime();
        generate(dir, "header-" + n, n, Scenario.CONVERGING, "");
        long t1 = System.nanoTime();
        Path out = ReportWriter.write(dir, dir.resolve("report.html"), ZoneId.systemDefault());
        long t2 = System.nanoTime();
        long size = Files.size(out);
        System.out.printf(Locale.ROOT, "report bench: %,d iterations; history generated and saved in %.2f s"
                + " (%,d bytes); report written in %.2f s: %,d bytes (%.2f MB) at %s%n", n, (t1 - t0) / 1e9,
                Files.size(dir.resolve("history").resolve(RunHistory.fileName("header-" + n))), (t2 - t1) / 1e9,
                size, size / 1048576.0, out.toAbsolutePath());
    }

    /**
     * Writes into the state directory {@code dir} an invented run of {@code n} iterations: its series history
     * (every record fed through {@link RunHistory}), its timeline (through {@link Journal}, so the lines are
     * exactly what the daemon writes) and its run state. {@code decoration} is appended to the equation and
     * monitor names and to the detection summaries (tests put markup there to check escaping); may be empty.
     * Several runs may share one directory (one call each).
     */
    public static void generate(Path dir, String run, long n, Scenario scenario, String decoration)
            throws IOException {
        Files.createDirectories(dir);
        StateDir state;
        try {
            state = StateDir.open(dir, false);
        } catch (StateDir.LockedException e) {
            throw new IOException(e.getMessage(), e);
        }
        try (state) {
            HandClock clock = new HandClock(Instant.parse("2026-12-01T22:00:00Z"));
            RunHistory history = new RunHistory(run, state.historyDir());
            try (Journal journal = Journal.open(state.defaultTimeline(), clock, null, false)) {
                Writer w = new Writer(run, journal, clock, n, decoration);
                switch (scenario) {
                    case CONVERGING -> w.converging(history);
                    case STOPPED -> w.stopped(history);
                    case UNSTEADY -> w.unsteady(history);
                    default -> throw new IllegalArgumentException(String.valueOf(scenario));
                }
                history.save();
                Map<String, Object> rs = new LinkedHashMap<>();
                Map<String, Object> counters = new LinkedHashMap<>();
                counters.put("lines", n + 3);
                counters.put("records", n);
                counters.put("segments", 0);
                counters.put("malformed", Map.of("not_a_record", 2));
                rs.put("counters", counters);
                rs.put("last_iter", history.lastIter());
                rs.put("caught_up", true);
                rs.put("snapshot", w.snapshot);
                state.saveRun(run, rs);
            }
        }
    }

    /** Writes one scenario's records and events. */
    private static final class Writer {
        final String run;
        final Journal journal;
        final HandClock clock;
        final long n;
        final String deco;
        final Map<String, Object> snapshot = new LinkedHashMap<>();

        Writer(String run, Journal journal, HandClock clock, long n, String deco) {
            this.run = run;
            this.journal = journal;
            this.clock = clock;
            this.n = n;
            this.deco = deco;
        }

        void event(PendingEvent e) {
            clock.advance(1000);
            journal.append(e);
        }

        void detection(String pattern, DetectionState st, Severity sev, long iter, List<String> eqs, String monitor,
                String summary, String remedy, Map<String, Object> evidence) {
            event(PendingEvent.detection(run, new Detection(pattern, st, sev, iter, eqs, monitor, summary + deco,
                    remedy, evidence)));
        }

        void runEvent(long iter, String state, String reason) {
            event(PendingEvent.run(run, iter, state, reason));
        }

        void notice(long iter, String state, Severity sev, String pattern, int attempt, String error) {
            Map<String, Object> f = new LinkedHashMap<>();
            f.put("channel", "webhook:ops");
            f.put("notice_id", run + "-" + iter);
            f.put("attempt", attempt);
            f.put("pattern", pattern);
            f.put("error", error);
            event(new PendingEvent(run, EventType.NOTICE, iter, state, sev, f));
        }

        /** Time passes with the records: one hour per million iterations. */
        void advanceTo(long iter, long prev) {
            clock.advance((iter - prev) * 3600L / 1000L);
        }

        void converging(RunHistory h) {
            List<String> eqs = List.of("continuity" + deco, "x-momentum", "y-momentum", "energy" + deco);
            List<String> mons = List.of("drag-force" + deco, "outlet-temp");
            double[] start = {3e-2, 1e-1, 8e-2, 5e-3};
            long spike0 = (long) (0.30 * n);
            long spike1 = (long) (0.36 * n);
            long settle = (long) (0.70 * n);
            long conv = (long) (0.92 * n);
            runEvent(0, "started", "replay of header.log");
            long last = 0;
            for (long i = 1; i <= n; i++) {
                double f = (double) i / n;
                double[] r = new double[4];
                for (int k = 0; k < 4; k++) {
                    r[k] = start[k] * Math.pow(10, -7.2 * f) * (1 + 0.35 * Math.sin(i / 37.0 + k));
                }
                if (i >= spike0 && i < spike1) {
                    double u = (double) (i - spike0) / (spike1 - spike0);
                    r[3] *= Math.pow(10, 3.5 * Math.sin(Math.PI * u));
                }
                double drag = 412.7 + 40 * Math.exp(-i / (0.12 * n)) * Math.cos(i / 900.0) + 0.05 * Math.sin(i / 7.0);
                double temp = 301.2 + 6 * Math.exp(-i / (0.05 * n));
                h.observe(IterationRecord.steady(i, new Samples(eqs, r), new Samples(mons, new double[] {drag, temp})));
                if (i == n / 10 || i == spike0 || i == spike1 || i == settle || i == conv || i == n) {
                    advanceTo(i, last);
                    last = i;
                }
                if (i == n / 10) {
                    detection("residual-level", DetectionState.INFO, Severity.INFO, i, List.of("x-momentum"), null,
                            "x-momentum residual below 1e-3", "", Map.of("level", 1e-3));
                }
                if (i == spike0 + (spike1 - spike0) / 5) {
                    Map<String, Object> ev = new LinkedHashMap<>();
                    ev.put("slope_decades_per_iter", 3.5 * 5 / (spike1 - spike0));
                    ev.put("rise_decades", 1.9);
                    detection("single-equation-blowup", DetectionState.OPEN, Severity.CRITICAL, i, List.of(eqs.get(3)),
                            null, "energy residual rising while the others fall",
                            "lower the energy under-relaxation factor (0.9 to 0.7) and check the wall heat-flux"
                                    + " boundary values", ev);
                    notice(i, "queued", Severity.CRITICAL, "single-equation-blowup", 1, null);
                    notice(i, "failed", Severity.CRITICAL, "single-equation-blowup", 1, "HTTP 503 from the receiver");
                    notice(i, "sent", Severity.CRITICAL, "single-equation-blowup", 2, null);
                }
                if (i == spike1) {
                    detection("single-equation-blowup", DetectionState.RESOLVED, Severity.CRITICAL, i,
                            List.of(eqs.get(3)), null, "energy residual falling again", "", Map.of());
                }
                if (i == settle) {
                    Map<String, Object> ev = new LinkedHashMap<>();
                    ev.put("mean", 412.71);
                    ev.put("half_width", 0.35);
                    ev.put("tolerance", 0.41);
                    ev.put("predicted_final", 412.7);
                    ev.put("remaining_error", 0.02);
                    detection("monitor-settled", DetectionState.OPEN, Severity.INFO, i, List.of(), mons.get(0),
                            mons.get(0) + " flat within 0.1 %", "", ev);
                }
                if (i == conv) {
                    Map<String, Object> ev = new LinkedHashMap<>();
                    ev.put("basis", "residuals-and-monitors");
                    ev.put("energy_residual", r[3]);
                    ev.put("energy_target", 1e-6);
                    ev.put("odd_value", Double.NaN);
                    detection("converged", DetectionState.OPEN, Severity.INFO, i, eqs, null,
                            "meets the configured criteria: 4 residuals at target and 2 monitors settled", "", ev);
                    notice(i, "sent", Severity.INFO, "converged", 1, null);
                }
            }
            runEvent(n, "ended", "end of the log (replay)");
            Map<String, Object> eqSnap = new LinkedHashMap<>();
            for (int k = 0; k < eqs.size(); k++) {
                Map<String, Object> f = new LinkedHashMap<>();
                f.put("residual", start[k] * Math.pow(10, -7.2));
                f.put("target", 1e-6);
                f.put("forecast", "reached");
                f.put("iterations", 0.0);
                f.put("iterations_low", 0.0);
                f.put("iterations_high", 0.0);
                f.put("slope_decades_per_iteration", -7.2 / n);
                eqSnap.put(eqs.get(k), f);
            }
            Map<String, Object> monSnap = new LinkedHashMap<>();
            monSnap.put(mons.get(0), Map.of("state", "settled", "value", 412.71, "half_width", 0.35,
                    "predicted_final", 412.69, "remaining_error", 0.02));
            monSnap.put(mons.get(1), Map.of("state", "settled", "value", 301.2, "half_width", 0.01,
                    "predicted_final", 301.2, "remaining_error", 0.001));
            Map<String, Object> conv2 = new LinkedHashMap<>();
            conv2.put("verdict", "converged");
            conv2.put("waiting_for", List.of());
            conv2.put("equations", eqSnap);
            conv2.put("monitors", monSnap);
            snapshot.put("ConvergedDetector", conv2);
        }

        void stopped(RunHistory h) {
            List<String> eqs = List.of("continuity", "x-momentum", "y-momentum", "z-momentum");
            List<String> mons = List.of("fan-pressure-rise");
            long turn = (long) (0.55 * n);
            long stopAt = (long) (0.62 * n);
            runEvent(0, "started", "watching tunnel-fan.log");
            for (long i = 1; i <= stopAt; i++) {
                double f = (double) i / n;
                double[] r = new double[4];
                for (int k = 0; k < 4; k++) {
                    double base = 1e-1 * Math.pow(10, -4 * f);
                    if (i > turn && k > 0) {
                        base *= Math.pow(10, 40.0 * (i - turn) / n);
                    }
                    r[k] = base * (1 + 0.5 * Math.abs(Math.sin(i / 23.0 + k)));
                }
                double dp = 180 + 15 * Math.sin(i / 400.0) + (i > turn ? 0.002 * (i - turn) : 0);
                h.observe(IterationRecord.steady(i, new Samples(eqs, r), new Samples(mons, new double[] {dp})));
            }
            clock.advance(3 * 3600_000L);
            long open = turn + (stopAt - turn) / 3;
            Map<String, Object> ev = new LinkedHashMap<>();
            ev.put("equations_rising", 3);
            ev.put("family", "momentum");
            detection("family-divergence", DetectionState.OPEN, Severity.CRITICAL, open,
                    eqs.subList(1, 4), null, "the momentum equations turned from falling to rising together",
                    "reduce the momentum relaxation factors (0.7 to 0.5) or restart from the last good state with"
                            + " first-order upwind for momentum", ev);
            notice(open, "sent", Severity.CRITICAL, "family-divergence", 1, null);
            Map<String, Object> a = new LinkedHashMap<>();
            a.put("method", "slurm");
            a.put("signal", "TERM");
            a.put("reason", "family-divergence: the momentum equations diverge");
            a.put("core_hours_saved", null);
            a.put("pattern", "family-divergence");
            event(new PendingEvent(run, EventType.ACTION, stopAt, "requested", Severity.CRITICAL, a));
            Map<String, Object> d = new LinkedHashMap<>(a);
            d.put("core_hours_saved", 1843.2);
            d.put("core_hours_note", "up to 1843.2 core-hours: 256 cores for the 7.2 h left of a 24 h time limit"
                    + " (scheduler)");
            event(new PendingEvent(run, EventType.ACTION, stopAt, "done", Severity.CRITICAL, d));
            runEvent(stopAt, "ended", "the watched job slurm:4711 ended");
        }

        void unsteady(RunHistory h) {
            List<String> eqs = List.of("continuity", "momentum", "energy");
            List<String> mons = List.of("panel-temp");
            int inner = 20;
            long steps = Math.max(2, n / inner);
            long iter = 0;
            runEvent(0, "started", "watching rooftop-array.log");
            for (long s = 1; s <= steps; s++) {
                double peak = 1e-2 * Math.pow(10, 2.0 * s / steps);
                for (int k = 1; k <= inner; k++) {
                    iter++;
                    double[] r = new double[3];
                    for (int e = 0; e < 3; e++) {
                        r[e] = peak * (1 + 0.3 * e) * Math.pow(10, -3.0 * (k - 1) / (inner - 1) * (1 - 0.6 * s / steps));
                    }
                    if (s == steps && k == inner) {
                        r[2] = Double.NaN;
                    }
                    double temp = 318 + 4 * Math.sin(s / 50.0);
                    h.observe(new IterationRecord(iter, s, s * 0.01, k, new Samples(eqs, r),
                            new Samples(mons, new double[] {temp}), 0, iter));
                }
            }
            clock.advance(3600_000L);
            long open = (long) (iter * 0.4);
            Map<String, Object> ev = new LinkedHashMap<>();
            ev.put("equation", "momentum");
            ev.put("slope_decades_per_step", 2.0 / steps);
            ev.put("p_value", 1e-4);
            detection("rising-peaks", DetectionState.OPEN, Severity.WARNING, open, List.of("momentum"), null,
                    "momentum peak at the start of each time step climbs step after step",
                    "halve the time step (0.01 s to 0.005 s) or add inner iterations per step", ev);
            detection("non-finite", DetectionState.OPEN, Severity.CRITICAL, iter, List.of("energy"), null,
                    "energy residual is NaN", "restart from the last saved state with a smaller time step",
                    Map.of("value", "NaN"));
            runEvent(iter, "ended", "end of the log");
        }
    }
}
