package dev.watcher.daemon;

import dev.watcher.parse.FormatSpec;
import dev.watcher.rules.RuleSet;
import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.ArrayList;
import java.util.Comparator;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.TimeUnit;
import java.util.stream.Stream;

/**
 * {@code demo}: our own small solver runs three scenarios as child processes, each writing its log live;
 * the daemon watches them side by side, prints detections as they happen, stops the diverging case (with
 * {@code --stop} semantics, on the demo's own child process) and ends when every solver has ended.
 */
public final class Demo {

    /**
     * One demo scenario: the run name, the solver's scenario, the layout it writes, the format that reads it,
     * what it should raise, and how many iterations the solver runs (0: the scenario's own count).
     */
    public record Scenario(String run, String scenario, String layout, FormatSpec format, String expect,
            int iterations) {
    }

    private Demo() {
    }

    /**
     * Runs the demo in {@code outDir} (cleared first). {@code http} serves the live view when not null;
     * {@code keepOpen} keeps the daemon up after the solvers end, until a signal. Returns the state directory.
     */
    public static Path run(Path outDir, List<Scenario> scenarios, RuleSet rules, long paceMs, String http,
            boolean keepOpen, Duration limit, PrintStream out, java.util.function.Consumer<Daemon> onDaemon)
            throws Exception {
        clear(outDir);
        Files.createDirectories(outDir);
        String javaBin = Path.of(System.getProperty("java.home"), "bin", "java").toString();
        String cp = System.getProperty("java.class.path");
        List<Process> children = new ArrayList<>();
        List<RunSpec> runs = new ArrayList<>();
        Map<String, String> jobs = new LinkedHashMap<>();
        try {
            for (Scenario s : scenarios) {
                Path caseDir = outDir.resolve(s.run());
                Files.createDirectories(caseDir);
                Path log = caseDir.resolve(s.run() + ".log");
                Files.writeString(log, ""); // the solver appends; the daemon may open it before the first line
                ProcessBuilder pb = new ProcessBuilder(javaBin, "-Xmx96m", "-XX:+UseSerialGC", "-XX:TieredStopAtLevel=1",
                        "-cp", cp, "dev.watcher.demo.DemoSolverMain", "--scenario", s.scenario(), "--layout",
                        s.layout(), "--out", log.toString(), "--pace-ms", Long.toString(paceMs));
                if (s.iterations() > 0) {
                    pb.command().addAll(List.of("--iterations", Integer.toString(s.iterations())));
                }
                pb.redirectErrorStream(true);
                pb.redirectOutput(caseDir.resolve("solver-console.txt").toFile());
                Process p = pb.start();
                children.add(p);
                runs.add(new RunSpec(s.run(), List.of(log), List.of(s.format())));
                jobs.put(s.run(), "pid:" + p.pid());
                out.println("demo: " + s.run() + " (" + s.scenario() + ", " + s.layout() + " layout) started as pid "
                        + p.pid() + "; should raise " + s.expect());
            }
            Path state = outDir.resolve("state");
            DaemonConfig c = new DaemonConfig(runs, rules, Map.of("log-silent.min_seconds", "60"), List.of(), state,
                    null, false, jobs, true, dev.watcher.act.StopPolicy.defaults().withGrace(Duration.ofSeconds(5)), http, null, false, Duration.ofMillis(200), Duration.ofMillis(1000),
                    Duration.ofSeconds(60), Duration.ofSeconds(5), out, false, null);
            Daemon d = new Daemon(c).endWhenJobsEnd(!keepOpen);
            onDaemon.accept(d);
            Thread limiter = new Thread(() -> {
                try {
                    Thread.sleep(limit.toMillis());
                    d.shutdown("the demo's time limit was reached");
                } catch (InterruptedException e) {
                    Thread.currentThread().interrupt();
                }
            }, "demo-limit");
            limiter.setDaemon(true);
            if (!keepOpen) {
                limiter.start();
            }
            d.run();
            limiter.interrupt();
            return state;
        } finally {
            for (Process p : children) {
                if (p.isAlive()) {
                    p.destroy();
                    if (!p.waitFor(5, TimeUnit.SECONDS)) {
                        p.destroyForcibly();
                    }
                }
            }
        }
    }

    private static void clear(Path dir) throws IOException {
        if (!Files.exists(dir)) {
            return;
        }
        try (Stream<Path> walk = Files.walk(dir)) {
            for (Path p : walk.sorted(Comparator.reverseOrder()).toList()) {
                Files.deleteIfExists(p);
            }
        }
    }
}
