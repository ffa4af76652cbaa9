package dev.watcher.daemon;

import dev.watcher.detect.DetectSettings;
import dev.watcher.detect.Detectors;
import dev.watcher.model.LineParser;
import dev.watcher.parse.FormatSpec;
import dev.watcher.rules.Decider;
import dev.watcher.rules.RuleSet;
import java.time.Clock;
import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

/** Assembles one run's pipeline from its spec, the rules and the command line's overrides. */
final class Pipelines {

    private Pipelines() {
    }

    static DetectSettings settings(RunSpec spec, RuleSet runRules, Map<String, String> cliOverrides) {
        Map<String, String> ov = new LinkedHashMap<>(runRules.detectorOverrides());
        ov.putAll(cliOverrides);
        Map<String, List<String>> families = new LinkedHashMap<>();
        for (FormatSpec f : spec.formats()) {
            families.putAll(f.families());
        }
        return DetectSettings.of(ov, families);
    }

    static RunPipeline build(RunSpec spec, RuleSet rules, Map<String, String> cliOverrides, RunOutputs out, int joinBound,
            Clock clock) {
        RuleSet runRules = rules.forRun(spec.name());
        List<LineParser> parsers = new ArrayList<>();
        for (FormatSpec f : spec.formats()) {
            parsers.add(f.newParser());
        }
        Decider decider = new Decider(runRules, spec.name(), clock);
        return new RunPipeline(spec.name(), parsers, Detectors.standard(settings(spec, runRules, cliOverrides)),
                decider, out, new RunCounters(), clock, joinBound);
    }
}
