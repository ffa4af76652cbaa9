package dev.watcher.cli;

import dev.watcher.daemon.Daemon;
import dev.watcher.daemon.DaemonConfig;
import dev.watcher.daemon.RunSpec;
import dev.watcher.act.JobRef;
import dev.watcher.act.StopPolicy;
import dev.watcher.journal.StateDir;
import java.time.Duration;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.concurrent.Callable;
import picocli.CommandLine.Command;
import picocli.CommandLine.Mixin;
import picocli.CommandLine.Option;
import picocli.CommandLine.Parameters;

@Command(name = "watch", mixinStandardHelpOptions = true,
        description = {"Follow one or more growing logs until stopped (SIGTERM/SIGINT) or until the watched job"
                + " ends.",
            "Reads each log from its start (the run's history matters) and, once caught up, notifies only about"
                    + " conditions still open. A restarted daemon neither loses nor repeats a line or an event."})
final class WatchCommand implements Callable<Integer> {

    @Parameters(arity = "1..*", paramLabel = "LOG", description = "Log files; join files that feed one run with"
            + " '+' (residuals.log+monitors.log).")
    List<String> logs;

    @Mixin
    OptionsHolder holder = new OptionsHolder();

    @Option(names = "--from-end", description = "Skip the history: start at the current end of each log.")
    boolean fromEnd;

    @Option(names = "--job", paramLabel = "JOB", description = "The job the run belongs to: pid:N, slurm:ID[_TASK]"
            + "[.STEP] or pbs:ID. Repeat once per log, in order, or give one for all.")
    List<String> jobs = new java.util.ArrayList<>();

    @Option(names = "--stop", description = "Let the rules' stop actions act on the job (without it they are only"
            + " recorded as 'would stop').")
    boolean stop;

    @Option(names = "--stop-signal", paramLabel = "SIG", description = "The graceful signal of a stop (default TERM).")
    String stopSignal = "TERM";

    @Option(names = "--stop-grace", paramLabel = "SECONDS", description = "How long the job may take to end after"
            + " the graceful step before it is forced (default 30).")
    long stopGrace = 30;

    @Option(names = "--stop-file", paramLabel = "NAME", description = "Also write a stop file for solvers that poll"
            + " for one (a relative name goes into the log's folder; e.g. " + StopPolicy.STOP_FILE_NAME + ").")
    String stopFile;

    @Option(names = "--stop-command", paramLabel = "ARG", split = " ", description = "A command run (without a"
            + " shell) as the graceful step, {job} and {run} substituted, e.g. --stop-command 'mysolver-ctl halt"
            + " {job}'.")
    List<String> stopCommand = new java.util.ArrayList<>();

    @Option(names = "--cores", paramLabel = "N", description = "The job's cores, where the scheduler does not say"
            + " (for the core-hours a stop saves).")
    Integer cores;

    @Option(names = "--time-limit", paramLabel = "HOURS", description = "The job's time limit in hours, where the"
            + " scheduler does not say.")
    Double timeLimitHours;

    @Option(names = "--http", paramLabel = "HOST:PORT", description = "Serve the live view and /metrics (loopback"
            + " by default; HOST:0 picks a free port).")
    String http;

    @Option(names = "--http-token-file", paramLabel = "FILE", description = "The live view's access token, read"
            + " from a file (or set WATCHER_HTTP_TOKEN); required when --http binds a non-loopback address.")
    java.nio.file.Path httpTokenFile;

    @Option(names = "--poll-ms", paramLabel = "MS", description = "Poll interval while a file grows (default 500);"
            + " idle files are polled less often, up to --idle-poll-ms.")
    long pollMs = 500;

    @Option(names = "--idle-poll-ms", paramLabel = "MS", description = "Longest poll interval while a file is idle"
            + " (default 4000).")
    long idlePollMs = 4000;

    @Option(names = "--silence-min", paramLabel = "SECONDS", description = "Shortest silence that counts as a silent"
            + " log (default 300; the watchdog also waits 20x the median interval between records).")
    long silenceMin = 300;

    @Override
    public Integer call() throws Exception {
        CommonOptions o = holder.common;
        Logs.configure(o.verbose);
        List<RunSpec> runs = Assembly.runs(logs, o);
        Map<String, String> jobMap = new LinkedHashMap<>();
        if (!jobs.isEmpty()) {
            if (jobs.size() != 1 && jobs.size() != runs.size()) {
                throw new Main.UserError("--job was given " + jobs.size() + " times for " + runs.size()
                        + " logs: give it once for all, or once per log in order");
            }
            for (int i = 0; i < runs.size(); i++) {
                jobMap.put(runs.get(i).name(), jobs.size() == 1 ? jobs.get(0) : jobs.get(i));
            }
            for (String j : jobMap.values()) {
                try {
                    JobRef.parse(j);
                } catch (IllegalArgumentException e) {
                    throw new Main.UserError("--job " + j + ": " + e.getMessage());
                }
            }
        }
        if (stop && jobMap.isEmpty()) {
            System.err.println("watcher: note: --stop without --job: stop actions can only write a stop file"
                    + " where the rules ask for one");
        }
        dev.watcher.rules.RuleSet rules = Assembly.rules(o.rules);
        Assembly.checkParameters(rules, runs, o.overrides);
        DaemonConfig c = new DaemonConfig(runs, rules, o.overrides,
                Assembly.quickChannels(holder.channels), Assembly.stateDir(o, runs, ".watcher"), o.timeline, fromEnd,
                jobMap, stop, stopPolicy(), http, httpToken(), false, Duration.ofMillis(pollMs), Duration.ofMillis(idlePollMs),
                Duration.ofSeconds(silenceMin), null, System.out, o.quiet, null);
        Daemon d = new Daemon(c);
        Signals.onTermOrInt(() -> d.shutdown("watcher stopped by a signal"));
        try {
            return d.run();
        } catch (StateDir.LockedException e) {
            throw new Main.UserError(e.getMessage(), e);
        }
    }

    private String httpToken() {
        if (httpTokenFile != null) {
            return Assembly.read(httpTokenFile, "token").strip();
        }
        String env = System.getenv("WATCHER_HTTP_TOKEN");
        return env == null || env.isBlank() ? null : env.strip();
    }

    private StopPolicy stopPolicy() {
        StopPolicy p;
        try {
            p = StopPolicy.defaults().withSignal(stopSignal).withGrace(Duration.ofSeconds(stopGrace));
        } catch (IllegalArgumentException e) {
            throw new Main.UserError("--stop-signal/--stop-grace: " + e.getMessage());
        }
        if (stopFile != null) {
            p = p.withStopFile(java.nio.file.Path.of(stopFile));
        }
        if (!stopCommand.isEmpty()) {
            p = p.withCommand(stopCommand);
        }
        if (cores != null || timeLimitHours != null) {
            p = p.withGiven(cores, timeLimitHours == null ? null
                    : Duration.ofMinutes(Math.round(timeLimitHours * 60)));
        }
        return p;
    }

    /** Groups the shared mixins. */
    static final class OptionsHolder {
        @Mixin
        CommonOptions common = new CommonOptions();
        @Mixin
        ChannelOptions channels = new ChannelOptions();
    }
}
