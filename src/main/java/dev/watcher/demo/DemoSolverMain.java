package dev.watcher.demo;

import java.io.BufferedInputStream;
import java.io.BufferedOutputStream;
import java.io.BufferedWriter;
import java.io.DataInputStream;
import java.io.DataOutputStream;
import java.io.IOException;
import java.io.OutputStreamWriter;
import java.io.PrintStream;
import java.io.Writer;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.StandardOpenOption;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.concurrent.CountDownLatch;
import java.util.concurrent.TimeUnit;

/**
 * The demo solver as a child process: runs one {@link Scenario} and writes its log live, one flushed line at
 * a time.
 *
 * <pre>
 * java -cp watcher.jar dev.watcher.demo.DemoSolverMain --scenario NAME --layout jsonl|pass-line|sweep-block|table
 *      --out FILE [--pace-ms N | --seconds S] [--iterations N]
 * </pre>
 *
 * <p>{@code --pace-ms} sleeps between iterations so a watcher sees the file grow (the full-speed run takes
 * about a second); {@code --seconds S} picks the pace that spreads the run's iterations over about S seconds
 * (the live demo uses 20-90 s). {@code --iterations} overrides the scenario's length (for a resumed run: the
 * number of further iterations). {@code --save-state FILE} writes the solver's whole state when the run ends
 * or is stopped (not after a blow-up); {@code --resume-state FILE} continues from such a state: the log is
 * appended to, starting with a declared restart line, and the iteration count continues. The process stops early, after finishing the line it is writing, on SIGTERM (a shutdown
 * hook) or when a file named {@value #HALT_FILE} appears in the folder of the output file; in the second case
 * it writes a closing note and exits 0. Exit codes: 0 finished or halted, 2 bad usage, 3 I/O failure, 4 the
 * numerics blew up (non-finite residuals; the log ends with them).
 */
public final class DemoSolverMain {

    /** Name of the stop file the solver polls for beside its log (our own convention). */
    public static final String HALT_FILE = "halt.request";

    /** Exit status when the run ended because its residuals became non-finite. */
    public static final int EXIT_BLOWUP = 4;

    private DemoSolverMain() {
    }

    public static void main(String[] args) {
        int code = run(args, System.err);
        if (code != 0) {
            System.exit(code);
        }
    }

    /** Runs with the given arguments; returns the exit status (the hook path exits on its own). */
    static int run(String[] args, PrintStream err) {
        Map<String, String> opts = new LinkedHashMap<>();
        for (int i = 0; i < args.length; i++) {
            String a = args[i];
            if (a.equals("--help") || a.equals("-h")) {
                err.println(usage());
                return 0;
            }
            if (!a.startsWith("--") || i + 1 >= args.length) {
                err.println("demo solver: unexpected argument '" + a + "'\n" + usage());
                return 2;
            }
            opts.put(a.substring(2), args[++i]);
        }
        Scenario scenario;
        Path saveState;
        Path resumeState;
        LogWriter.Layout layout;
        Path outFile;
        long pace;
        int iterations;
        try {
            if (!opts.containsKey("scenario") || !opts.containsKey("out")) {
                throw new IllegalArgumentException("--scenario and --out are required");
            }
            scenario = Scenario.byId(opts.remove("scenario"));
            layout = LogWriter.Layout.byId(opts.getOrDefault("layout", "jsonl"));
            opts.remove("layout");
            outFile = Path.of(opts.remove("out"));
            pace = Long.parseLong(opts.getOrDefault("pace-ms", "0"));
            opts.remove("pace-ms");
            iterations = Integer.parseInt(opts.getOrDefault("iterations", Integer.toString(scenario.iterations())));
            opts.remove("iterations");
            if (opts.containsKey("seconds")) {
                // spread the run over about this many seconds of wall time
                double seconds = Double.parseDouble(opts.remove("seconds"));
                pace = Math.max(0, Math.round(seconds * 1000.0 / Math.max(1, iterations)));
            }
            saveState = opts.containsKey("save-state") ? Path.of(opts.remove("save-state")) : null;
            resumeState = opts.containsKey("resume-state") ? Path.of(opts.remove("resume-state")) : null;
            if (!opts.isEmpty()) {
                throw new IllegalArgumentException("unknown option --" + opts.keySet().iterator().next());
            }
            if (pace < 0 || iterations < 0) {
                throw new IllegalArgumentException("--pace-ms and --iterations must not be negative");
            }
        } catch (IllegalArgumentException e) { // NumberFormatException included
            err.println("demo solver: " + e.getMessage() + "\n" + usage());
            return 2;
        }
        try {
            return new Job(scenario, layout, outFile, pace, iterations, saveState, resumeState).execute();
        } catch (IOException e) {
            err.println("demo solver: I/O failure (log " + outFile + "): " + e);
            return 3;
        }
    }

    private static String usage() {
        return "usage: DemoSolverMain --scenario NAME --layout jsonl|pass-line|sweep-block|table --out FILE"
                + " [--pace-ms N | --seconds S] [--iterations N] [--save-state FILE] [--resume-state FILE]\n  scenarios: " + String.join(", ", Scenario.ids())
                + "\n  stop: SIGTERM, or create " + HALT_FILE + " beside the log";
    }

    /** One paced run; the shutdown hook and the main thread meet on {@code finished}. */
    private static final class Job {
        private final Scenario scenario;
        private final LogWriter.Layout layout;
        private final Path outFile;
        private final Path haltFile;
        private final long pace;
        private final int iterations;
        private final Path saveState;
        private final Path resumeState;
        private volatile boolean terminating;
        private final CountDownLatch finished = new CountDownLatch(1);

        Job(Scenario scenario, LogWriter.Layout layout, Path outFile, long pace, int iterations, Path saveState,
                Path resumeState) {
            this.saveState = saveState;
            this.resumeState = resumeState;
            this.scenario = scenario;
            this.layout = layout;
            this.outFile = outFile;
            Path dir = outFile.toAbsolutePath().getParent();
            this.haltFile = dir.resolve(HALT_FILE);
            this.pace = pace;
            this.iterations = iterations;
        }

        int execute() throws IOException {
            Path parent = outFile.toAbsolutePath().getParent();
            Files.createDirectories(parent);
            Thread hook = new Thread(() -> {
                terminating = true;
                try {
                    finished.await(5, TimeUnit.SECONDS);
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
            }, "demo-solver-term");
            Runtime.getRuntime().addShutdownHook(hook);
            int code = 0;
            ScenarioRun run;
            if (resumeState != null) {
                try (DataInputStream in = new DataInputStream(new BufferedInputStream(
                        Files.newInputStream(resumeState)))) {
                    run = new ScenarioRun(scenario, iterations, in);
                }
            } else {
                run = new ScenarioRun(scenario, iterations);
            }
            // a resumed run appends to its log, a fresh one starts it
            StandardOpenOption mode = resumeState != null ? StandardOpenOption.APPEND
                    : StandardOpenOption.TRUNCATE_EXISTING;
            try (Writer w = new BufferedWriter(new OutputStreamWriter(Files.newOutputStream(outFile,
                    StandardOpenOption.CREATE, mode, StandardOpenOption.WRITE), StandardCharsets.UTF_8))) {
                Map<String, String> units = new LinkedHashMap<>();
                for (int i = 0; i < run.monitorNames().size(); i++) {
                    units.put(run.monitorNames().get(i), run.monitorUnits().get(i));
                }
                LogWriter log = new LogWriter(w, layout, units);
                if (resumeState != null) {
                    last = run.iteration();
                    log.restart(run.iteration());
                }
                log.note("case " + scenario.id() + ": " + scenario.title());
                log.note("numerics: " + scenario.numerics());
                boolean blewUp = false;
                while (run.hasNext()) {
                    if (terminating) {
                        log.note("terminate signal, stopping after pass " + last);
                        break;
                    }
                    if (Files.exists(haltFile)) {
                        log.note(HALT_FILE + " found, stopping after pass " + last);
                        break;
                    }
                    ScenarioRun.Step step = run.next();
                    if (step.restartedFrom() >= 0) {
                        log.note("job requeued; resuming");
                        log.restart(step.restartedFrom());
                    }
                    if (step.note() != null) {
                        log.note(step.note());
                    }
                    log.write(step.record());
                    last = step.record().iter();
                    blewUp = !finite(step.record().residuals().values());
                    if (pace > 0 && run.hasNext()) {
                        sleep(pace);
                    }
                }
                if (blewUp && !terminating) {
                    log.note("floating-point blow-up, solver aborts at pass " + last);
                    code = EXIT_BLOWUP;
                } else if (!terminating && !run.hasNext()) {
                    log.note("end of run at pass " + last);
                }
                if (saveState != null && !blewUp) {
                    writeState(run);
                    log.note("state saved at pass " + last + " to " + saveState.getFileName());
                }
            } finally {
                finished.countDown();
            }
            if (!terminating) {
                try {
                    Runtime.getRuntime().removeShutdownHook(hook);
                } catch (IllegalStateException e) {
                    // shutdown already under way: the hook will see the latch open
                }
            }
            return code;
        }

        private long last;

        private void writeState(ScenarioRun run) throws IOException {
            Path tmp = saveState.resolveSibling(saveState.getFileName() + ".tmp");
            try (DataOutputStream out = new DataOutputStream(new BufferedOutputStream(Files.newOutputStream(tmp)))) {
                run.saveState(out);
            }
            Files.move(tmp, saveState, java.nio.file.StandardCopyOption.REPLACE_EXISTING,
                    java.nio.file.StandardCopyOption.ATOMIC_MOVE);
        }

        private static boolean finite(double[] values) {
            for (double v : values) {
                if (!Double.isFinite(v)) {
                    return false;
                }
            }
            return true;
        }

        private void sleep(long ms) {
            long end = System.nanoTime() + TimeUnit.MILLISECONDS.toNanos(ms);
            while (!terminating) {
                long left = end - System.nanoTime();
                if (left <= 0) {
                    return;
                }
                try {
                    Thread.sleep(Math.min(TimeUnit.NANOSECONDS.toMillis(left) + 1, 50));
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                    return;
                }
            }
        }
    }
}
