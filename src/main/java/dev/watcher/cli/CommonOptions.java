package dev.watcher.cli;

import java.nio.file.Path;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import picocli.CommandLine.Option;

/** The options that {@code watch} and {@code replay} share (CONTRACT.md, "Shared options"). */
final class CommonOptions {

    @Option(names = "--format", paramLabel = "FORMAT",
            description = "A format file, or a built-in: jsonl, table (default: jsonl). Repeat to give one per"
                    + " source file of a run (in order); one format applies to every file.")
    List<String> formats = new ArrayList<>();

    @Option(names = "--rules", paramLabel = "FILE",
            description = "A rules file (default: the project's rules/default.yaml). It replaces the default"
                    + " rules unless it declares that it extends them.")
    Path rules;

    @Option(names = "--timeline", paramLabel = "FILE", description = "The event timeline (default: timeline.jsonl"
            + " in the state directory).")
    Path timeline;

    @Option(names = "--state", paramLabel = "DIR", description = "The state directory (default: a folder named"
            + " after the run beside the first log).")
    Path state;

    @Option(names = "--run", paramLabel = "NAME", description = "The run's name (default: the log's file name up"
            + " to its last extension). Repeat for several logs, in order.")
    List<String> runs = new ArrayList<>();

    @Option(names = "--set", paramLabel = "KEY=VALUE", description = "A detector parameter for this run, e.g."
            + " --set converged.residual_target=1e-6 (see DEVELOPERS.md for the keys).")
    Map<String, String> overrides = new LinkedHashMap<>();

    @Option(names = {"-v", "--verbose"}, description = "Log what the daemon does (stderr).")
    boolean verbose;

    @Option(names = {"-q", "--quiet"}, description = "Do not print events on the console.")
    boolean quiet;
}
