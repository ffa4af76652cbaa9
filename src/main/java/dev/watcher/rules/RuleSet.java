package dev.watcher.rules;

import dev.watcher.model.ChannelSpec;
import dev.watcher.model.Severity;
import java.util.ArrayList;
import java.util.Collections;
import java.util.LinkedHashMap;
import java.util.LinkedHashSet;
import java.util.List;
import java.util.Map;
import java.util.Set;

/**
 * The rules in force: channels, delivery timing, what each pattern means for people, muting windows,
 * detector parameters and per-run overrides. Made by {@link RulesLoader}; immutable and safe to share.
 *
 * @param channels          every channel, rules-file ones first, then quick ones from the command line
 * @param floors            channel name to the least severity it receives (absent: every severity)
 * @param everyPattern      names of channels that receive every pattern (the quick channels), subject to
 *                          their floor
 * @param delivery          timing and routing used where a pattern's rule says nothing
 * @param patterns          pattern id to its rule (absent: {@link PatternRule#UNSET})
 * @param quiet             muting windows
 * @param detectorOverrides detector parameters, keys {@code pattern-id.parameter_name}, values as written
 * @param runs              per-run overrides not yet applied (see {@link #forRun})
 */
public record RuleSet(List<ChannelSpec> channels, Map<String, Severity> floors, Set<String> everyPattern,
        Delivery delivery, Map<String, PatternRule> patterns, List<Quiet> quiet,
        Map<String, String> detectorOverrides, List<RunRule> runs) {

    public RuleSet {
        channels = channels == null ? List.of() : List.copyOf(channels);
        floors = floors == null ? Map.of() : Collections.unmodifiableMap(new LinkedHashMap<>(floors));
        everyPattern = everyPattern == null ? Set.of() : Collections.unmodifiableSet(new LinkedHashSet<>(everyPattern));
        delivery = delivery == null ? Delivery.BUILT_IN : delivery;
        patterns = patterns == null ? Map.of() : Collections.unmodifiableMap(new LinkedHashMap<>(patterns));
        quiet = quiet == null ? List.of() : List.copyOf(quiet);
        detectorOverrides = detectorOverrides == null ? Map.of()
                : Collections.unmodifiableMap(new LinkedHashMap<>(detectorOverrides));
        runs = runs == null ? List.of() : List.copyOf(runs);
    }

    /** No channels, no pattern rules: detections keep their own severity and remedy, nothing is sent. */
    public static RuleSet empty() {
        return new RuleSet(List.of(), Map.of(), Set.of(), Delivery.BUILT_IN, Map.of(), List.of(), Map.of(),
                List.of());
    }

    /** The rule for a pattern id; {@link PatternRule#UNSET} when the rules say nothing about it. */
    public PatternRule rule(String pattern) {
        return patterns.getOrDefault(pattern, PatternRule.UNSET);
    }

    /**
     * Adds channels given on the command line: they receive notices of severity warning and above about
     * every pattern, and the resolved notices of those (CONTRACT.md). A quick channel with the name of a
     * rules channel replaces it.
     */
    public RuleSet withQuickChannels(List<ChannelSpec> quick) {
        List<ChannelSpec> all = new ArrayList<>();
        Map<String, Severity> f = new LinkedHashMap<>(floors);
        Set<String> every = new LinkedHashSet<>(everyPattern);
        for (ChannelSpec c : channels) {
            if (quick.stream().noneMatch(q -> q.name().equals(c.name()))) {
                all.add(c);
            }
        }
        for (ChannelSpec q : quick) {
            all.add(q);
            f.put(q.name(), Severity.WARNING);
            every.add(q.name());
        }
        return new RuleSet(all, f, every, delivery, patterns, quiet, detectorOverrides, runs);
    }

    /**
     * These rules as they hold for one run: the per-run overrides whose glob matches it laid over the
     * file's rules in file order (pattern rules, mutes without end, detector parameters, grouping wait).
     * The result has no per-run overrides left, so applying it again changes nothing.
     */
    public RuleSet forRun(String run) {
        if (runs.isEmpty()) {
            return this;
        }
        Map<String, PatternRule> p = new LinkedHashMap<>(patterns);
        List<Quiet> q = new ArrayList<>(quiet);
        Map<String, String> tune = new LinkedHashMap<>(detectorOverrides);
        Delivery d = delivery;
        for (RunRule r : runs) {
            if (!r.appliesTo(run)) {
                continue;
            }
            r.patterns().forEach((id, top) -> p.put(id, p.getOrDefault(id, PatternRule.UNSET).over(top)));
            if (!r.mute().isEmpty()) {
                q.add(new Quiet(r.mute(), List.of(run), null, null, null));
            }
            tune.putAll(r.tune());
            if (r.gather() != null) {
                d = d.withGather(r.gather());
            }
        }
        return new RuleSet(channels, floors, everyPattern, d, p, q, tune, List.of());
    }

    /** The least severity a channel receives. */
    public Severity floor(String channel) {
        return floors.getOrDefault(channel, Severity.INFO);
    }

    /**
     * The channel names that get notices about a pattern: the rule's {@code send-to} (or the delivery
     * default; {@code all} expands to every rules channel), then every quick channel; no duplicates.
     */
    public List<String> routes(String pattern) {
        List<String> named = rule(pattern).sendTo();
        if (named == null) {
            named = delivery.sendTo();
        }
        Set<String> out = new LinkedHashSet<>();
        for (String n : named) {
            if (Delivery.ALL.equals(n)) {
                for (ChannelSpec c : channels) {
                    if (!everyPattern.contains(c.name())) {
                        out.add(c.name());
                    }
                }
            } else {
                out.add(n);
            }
        }
        out.addAll(everyPattern);
        return List.copyOf(out);
    }
}
