package dev.watcher.cli;

import dev.watcher.daemon.DaemonConfig;
import dev.watcher.daemon.Replay;
import dev.watcher.daemon.RunSpec;
import dev.watcher.journal.StateDir;
import java.util.List;
import java.util.Map;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

@Command(name = "replay", mixinStandardHelpOptions = true,
        description = {"Run the watching pipeline over finished logs at full speed, into a fresh state directory"
                + " (default: RUN.replay beside the log).",
            "Deterministic: the same input gives the same detections. No notifications unless --notify; never"
                    + " stops a job."})
final class ReplayCommand implements Callable<Integer> {

    @Parameters(arity = "1..*", paramLabel = "LOG", description = "Log files; join files that feed one run with '+'.")
    List<String> logs;

    @Mixin
    WatchCommand.OptionsHolder holder = new WatchCommand.OptionsHolder();

    @Option(names = "--notify", description = "Send notifications to the rules' and quick channels.")
    boolean notify;

    @Override
    public Integer call() throws Exception {
        CommonOptions o = holder.common;
        Logs.configure(o.verbose);
        List<RunSpec> runs = Assembly.runs(logs, o);
        for (RunSpec r : runs) {
            for (var p : r.sources()) {
                if (!java.nio.file.Files.isRegularFile(p)) {
                    throw new Main.UserError(p + ": no such log file");
                }
            }
        }
        dev.watcher.rules.RuleSet rules = Assembly.rules(o.rules);
        Assembly.checkParameters(rules, runs, o.overrides);
        DaemonConfig c = new DaemonConfig(runs, rules, o.overrides,
                Assembly.quickChannels(holder.channels), Assembly.stateDir(o, runs, ".replay"), o.timeline, false,
                Map.of(), false, null, null, null, notify, null, null, null, null, System.out, o.quiet, null);
        try {
            return Replay.run(c);
        } catch (StateDir.LockedException e) {
            throw new Main.UserError(e.getMessage(), e);
        }
    }
}
