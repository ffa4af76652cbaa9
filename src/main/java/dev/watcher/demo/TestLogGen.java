package dev.watcher.demo;

import java.io.IOException;
import java.io.PrintStream;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

/**
 * Regenerates the example logs in {@code test-logs/} from the demo solver (each one a full-speed run of
 * {@link DemoSolverMain}, so the files are exactly what the child process writes).
 *
 * <pre>
 * java -cp target/classes:... dev.watcher.demo.TestLogGen [DIR]     (default DIR: test-logs)
 * </pre>
 */
public final class TestLogGen {

    /** One example log: scenario, layout, file name. */
    record Example(String scenario, String layout, String file) {
    }

    /** Every example the README describes, in its order. */
    static final List<Example> EXAMPLES = List.of(
            new Example("converging", "jsonl", "converging.jsonl"),
            new Example("converging", "pass-line", "converging.pass-line.log"),
            new Example("converging", "table", "converging.table.log"),
            new Example("hot-relaxation", "jsonl", "hot-relaxation.jsonl"),
            new Example("hot-relaxation", "pass-line", "hot-relaxation.pass-line.log"),
            new Example("hot-relaxation", "table", "hot-relaxation.table.log"),
            new Example("big-step", "jsonl", "big-step.jsonl"),
            new Example("big-step", "sweep-block", "big-step.sweep-block.log"),
            new Example("big-step", "pass-line", "big-step.pass-line.log"),
            new Example("big-step", "table", "big-step.table.log"),
            new Example("high-peclet-central", "pass-line", "quirk-nan-at-blowup.pass-line.log"),
            new Example("restart", "pass-line", "quirk-restart.pass-line.log"),
            new Example("restart", "table", "quirk-restart.table.log"));

    private TestLogGen() {
    }

    public static void main(String[] args) throws IOException {
        Path dir = Path.of(args.length > 0 ? args[0] : "test-logs");
        int code = generate(dir, System.err);
        if (code != 0) {
            System.exit(code);
        }
    }

    /** Writes every example into {@code dir}; returns 0, or the first failing run's exit status. */
    static int generate(Path dir, PrintStream err) throws IOException {
        Files.createDirectories(dir);
        for (Example e : EXAMPLES) {
            Path out = dir.resolve(e.file());
            int code = DemoSolverMain.run(new String[] {"--scenario", e.scenario(), "--layout", e.layout(),
                "--out", out.toString()}, err);
            if (code != 0 && code != DemoSolverMain.EXIT_BLOWUP) {
                return code;
            }
            err.println("wrote " + out + " (" + Files.size(out) + " bytes)");
        }
        return 0;
    }
}
