package dev.watcher.cli;

import dev.watcher.daemon.Demo;
import dev.watcher.model.InputFileException;
import dev.watcher.parse.FormatSpec;
import dev.watcher.parse.Formats;
import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.time.Duration;
import java.util.List;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Option;

@Command(name = "demo", mixinStandardHelpOptions = true,
        description = {"The live demo: the project's own small cavity solver runs three cases as child processes,"
                + " each writing its log live; the daemon watches them side by side, prints detections as they"
                + " happen, stops the diverging case, and writes the timeline and the report.",
            "Ends by itself within about three minutes (or use --keep-open with --http to keep the live view up)."})
final class DemoCommand implements Callable<Integer> {

    @Option(names = "--out", paramLabel = "DIR", description = "Where the demo writes its logs, state and report"
            + " (default: ./watcher-demo; cleared first).")
    Path out = Path.of("watcher-demo");

    @Option(names = "--pace-ms", paramLabel = "MS", description = "Pause between solver iterations (default 40)"
            + " so the logs grow at a watchable pace.")
    long paceMs = 40;

    @Option(names = "--http", paramLabel = "HOST:PORT", description = "Serve the live view while the demo runs.")
    String http;

    @Option(names = "--keep-open", description = "Keep the daemon (and its live view) up after the solvers end,"
            + " until Ctrl-C.")
    boolean keepOpen;

    @Option(names = "--limit", paramLabel = "SECONDS", description = "End the demo after this long at the latest"
            + " (default 170).")
    long limit = 170;

    @Option(names = {"-v", "--verbose"}, description = "Log what the daemon does (stderr).")
    boolean verbose;

    @Override
    public Integer call() throws Exception {
        Logs.configure(verbose);
        List<Demo.Scenario> scenarios = List.of(
                new Demo.Scenario("east-header", "converging", "pass-line", shipped("pass-line.yaml"), "converged",
                        1300),
                new Demo.Scenario("east-header-hot", "hot-relaxation", "jsonl", Formats.builtIn("jsonl"),
                        "stalled-oscillation or family-divergence (and is stopped)", 0),
                new Demo.Scenario("tunnel-fan", "big-step", "sweep-block", shipped("sweep-block.yaml"),
                        "rising-peaks", 0));
        System.out.println("demo: three cases of our own small cavity solver, watched live (details: " + out
                + "/*/solver-console.txt)");
        Path state = Demo.run(out.toAbsolutePath(), scenarios, demoRules(), paceMs, http, keepOpen,
                Duration.ofSeconds(limit), System.out, d -> Signals.onTermOrInt(() -> d.shutdown(
                        "demo stopped by a signal")));
        System.out.println("demo: timeline: " + state.resolve("timeline.jsonl"));
        Path report = dev.watcher.report.ReportWriter.write(state, out.toAbsolutePath().resolve("report.html"),
                java.time.ZoneId.systemDefault());
        System.out.println("demo: report:   " + report);
        return 0;
    }

    /** The default rules with stop gates short enough for a demo (rules/examples/demo-fast-gates.yaml). */
    static dev.watcher.rules.RuleSet demoRules() throws IOException {
        String res = "rules/examples/demo-fast-gates.yaml";
        try (InputStream in = DemoCommand.class.getClassLoader().getResourceAsStream(res)) {
            if (in == null) {
                throw new IllegalStateException("the shipped rules " + res + " are missing from the build");
            }
            return dev.watcher.rules.RulesLoader.load(res, new String(in.readAllBytes(), StandardCharsets.UTF_8),
                    dev.watcher.rules.RulesLoader.defaults());
        } catch (InputFileException e) {
            throw new IllegalStateException("the shipped rules " + res + " are invalid: " + e.getMessage(), e);
        }
    }

    /** A format file shipped in test-logs/formats (on the classpath inside the jar). */
    static FormatSpec shipped(String name) throws IOException {
        String res = "test-logs/formats/" + name;
        try (InputStream in = DemoCommand.class.getClassLoader().getResourceAsStream(res)) {
            if (in == null) {
                throw new IllegalStateException("the shipped format " + res + " is missing from the build");
            }
            return Formats.load(res, new String(in.readAllBytes(), StandardCharsets.UTF_8));
        } catch (InputFileException e) {
            throw new IllegalStateException("the shipped format " + res + " is invalid: " + e.getMessage(), e);
        }
    }
}
