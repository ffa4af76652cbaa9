package dev.watcher.rules;

import java.time.Duration;
import java.util.List;
import java.util.Map;

/**
 * Overrides for the runs whose name matches {@code match} (a glob): pattern rules laid over the file's own,
 * patterns muted for the whole run, detector parameters, and the grouping wait.
 *
 * @param patterns pattern id to the fields this override says (see {@link PatternRule#over})
 * @param mute     pattern ids muted for these runs, without end
 * @param tune     detector parameters, keys {@code pattern-id.parameter_name}
 * @param gather   grouping wait for these runs, or null
 */
public record RunRule(String match, Map<String, PatternRule> patterns, List<String> mute, Map<String, String> tune,
        Duration gather) {

    public RunRule {
        patterns = patterns == null ? Map.of() : Map.copyOf(patterns);
        mute = mute == null ? List.of() : List.copyOf(mute);
        tune = tune == null ? Map.of() : Map.copyOf(tune);
    }

    public boolean appliesTo(String run) {
        return RunGlob.matches(match, run);
    }
}
