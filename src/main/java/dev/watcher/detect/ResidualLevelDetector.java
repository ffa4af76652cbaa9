package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import dev.watcher.model.Patterns;
import dev.watcher.model.Samples;
import dev.watcher.model.Severity;
import java.util.Arrays;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;
import java.util.function.Consumer;

/**
 * {@code residual-level}: an info event when an equation's residual first crosses a named level downward
 * (default 1e-3, 1e-4, 1e-5, 1e-6: about 1e-3 is too loose to trust, 1e-5 a good target, 1e-6 tighter than
 * most work needs; common practice, no published source). Once per level per equation per segment.
 *
 * <p>"Crossing downward" means the value is below the level now and was at or above it earlier in the same
 * segment, so a run restarted already below a level does not announce it again. When one record crosses
 * several levels at once, one event per level is emitted, highest level first. O(1) per value.
 *
 * <p>Parameter: {@code residual-level.levels}, a comma-separated list of positive numbers.
 */
final class ResidualLevelDetector implements Detector {

    static final String LEVELS = Patterns.RESIDUAL_LEVEL + ".levels";

    /** Descending. */
    private final double[] levels;
    private final PerName<State> states;

    ResidualLevelDetector(DetectSettings settings) {
        levels = parseLevels(settings.text(LEVELS, "1e-3,1e-4,1e-5,1e-6"));
        states = new PerName<>(State::new);
    }

    static double[] parseLevels(String text) {
        double[] l = Arrays.stream(text.split(",")).map(String::trim).filter(s -> !s.isEmpty())
                .mapToDouble(s -> {
                    try {
                        return Double.parseDouble(s);
                    } catch (NumberFormatException e) {
                        return Double.NaN;
                    }
                }).filter(d -> d > 0 && Double.isFinite(d)).map(d -> -d).sorted().map(d -> -d).distinct()
                .toArray();
        return l;
    }

    private final class State {
        final String name;
        /** Index of the highest level not yet crossed in this segment. */
        int next;
        /** Smallest index j such that the residual was at or above levels[j] in this segment (length = none). */
        int seenAbove = levels.length;

        State(String name) {
            this.name = name;
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        double[] v = res.values();
        List<State> slots = states.slots(res.names());
        for (int i = 0; i < v.length; i++) {
            double x = v[i];
            State s = slots.get(i);
            if (s.next >= levels.length || !(x >= 0) || x == Double.POSITIVE_INFINITY) {
                continue; // all levels done, or NaN/negative/infinite: not a level
            }
            // levels at or below x have now been seen from above
            while (s.seenAbove > 0 && x >= levels[s.seenAbove - 1]) {
                s.seenAbove--;
            }
            while (s.next < levels.length && x < levels[s.next]) {
                if (s.seenAbove <= s.next) {
                    out.accept(event(r, s.name, levels[s.next], x));
                }
                s.next++;
            }
        }
    }

    private Detection event(IterationRecord r, String eq, double level, double value) {
        Map<String, Object> ev = new LinkedHashMap<>();
        ev.put("level", level);
        ev.put("residual", Log10.round(value));
        String summary = eq + " residual fell below " + Log10.sci(level).replace("1.00e", "1e") + " ("
                + Log10.sci(value) + ")";
        return new Detection(Patterns.RESIDUAL_LEVEL, DetectionState.INFO, Severity.INFO, r.iter(), List.of(eq),
                null, summary, "", ev);
    }

    @Override
    public void segment(int segment, long iter, Consumer<Detection> out) {
        for (State s : states.all().values()) {
            s.next = 0;
            s.seenAbove = levels.length;
        }
    }
}
