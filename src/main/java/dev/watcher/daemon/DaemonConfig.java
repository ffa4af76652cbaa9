package dev.watcher.daemon;

import dev.watcher.model.ChannelSpec;
import dev.watcher.rules.RuleSet;
import java.io.PrintStream;
import java.nio.file.Path;
import java.time.Clock;
import java.time.Duration;
import java.util.List;
import java.util.Map;

/**
 * Everything the composition root needs to run {@code watch} or {@code replay}, as the CLI assembled and
 * validated it.
 *
 * @param overrides  detector parameter overrides from the command line ({@code pattern-id.parameter = value})
 * @param quick      channels from the quick options; they are added to the rules' channels
 * @param jobs       by run name, the job each run belongs to ({@code pid:N}, {@code slurm:ID}, ...); may be empty
 * @param stop       whether the rules' stop actions may act ({@code --stop})
 * @param stopPolicy how a stop is carried out (signal, grace, stop file, command); null for the defaults
 * @param http       {@code HOST:PORT} for the live view and metrics, or null
 * @param httpToken  the live view's access token (required off loopback), or null
 * @param sendNotices replay only: send notifications
 * @param pollMin    the follower's poll interval while a file grows
 * @param pollMax    the longest poll interval while a file is idle
 * @param silenceMin the shortest silence that counts as a silent log
 * @param out        the console (one readable line per event)
 */
public record DaemonConfig(List<RunSpec> runs, RuleSet rules, Map<String, String> overrides,
        List<ChannelSpec> quick, Path stateDir, Path timeline, boolean fromEnd, Map<String, String> jobs, boolean stop, dev.watcher.act.StopPolicy stopPolicy,
        String http, String httpToken, boolean sendNotices, Duration pollMin, Duration pollMax, Duration silenceMin,
        Duration drainBound, PrintStream out, boolean quiet, Clock clock) {

    public DaemonConfig {
        runs = List.copyOf(runs);
        overrides = overrides == null ? Map.of() : Map.copyOf(overrides);
        quick = quick == null ? List.of() : List.copyOf(quick);
        jobs = jobs == null ? Map.of() : Map.copyOf(jobs);
        if (clock == null) {
            clock = Clock.systemUTC();
        }
        if (pollMin == null) {
            pollMin = Duration.ofMillis(500);
        }
        if (pollMax == null) {
            pollMax = Duration.ofSeconds(4);
        }
        if (silenceMin == null) {
            silenceMin = Duration.ofMinutes(5);
        }
        if (drainBound == null) {
            drainBound = Duration.ofSeconds(20);
        }
    }

    /** The rules with the quick channels added: they route notices, and the dispatcher delivers to them. */
    public dev.watcher.rules.RuleSet effectiveRules() {
        return quick.isEmpty() ? rules : rules.withQuickChannels(quick);
    }

    /** The timeline file: given, or {@code timeline.jsonl} in the state directory. */
    public Path timelineFile() {
        return timeline != null ? timeline : stateDir.resolve("timeline.jsonl");
    }
}
