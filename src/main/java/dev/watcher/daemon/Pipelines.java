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
public final class Pipelines {

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

    /**
     * Problems with detector parameter overrides (from the rules' tune sections and --set): keys no detector
     * reads, and values that are not numbers where a number is expected. Empty when all are fine.
     */
    public static List<String> parameterProblems(Map<String, String> overrides) {
        DetectSettings s = DetectSettings.of(overrides, Map.of());
        Detectors.standard(s);
        Map<String, String> used = s.used();
        List<String> problems = new ArrayList<>();
        for (Map.Entry<String, String> e : overrides.entrySet()) {
            String inForce = used.get(e.getKey());
            if (inForce == null) {
                problems.add("unknown detector parameter '" + e.getKey() + "' (known: " + String.join(", ",
                        new java.util.TreeSet<>(used.keySet())) + ")");
            } else if (isNumber(inForce) && !isNumber(e.getValue())) {
                problems.add("detector parameter '" + e.getKey() + "' expects a number, found '" + e.getValue() + "'");
            }
        }
        return problems;
    }

    private static boolean isNumber(String v) {
        try {
            Double.parseDouble(v.trim());
            return true;
        } catch (NumberFormatException e) {
            return false;
        }
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
                decider, out, new RunCounters(), clock, joinBound, Detectors.SECOND_LANE_FROM);
    }
}
