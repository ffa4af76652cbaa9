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
 * several levels at once, one event per level is emitted, highest level first. O(levels) per value.
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
        /** above[k]: the residual was at or above levels[k] earlier in this segment. */
        final boolean[] above = new boolean[levels.length];
        final boolean[] announced = new boolean[levels.length];
        int remaining = levels.length;

        State(String name) {
            this.name = name;
        }

        void reset() {
            java.util.Arrays.fill(above, false);
            java.util.Arrays.fill(announced, false);
            remaining = levels.length;
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
            if (s.remaining == 0 || !(x >= 0) || x == Double.POSITIVE_INFINITY) {
                continue; // all levels announced, or NaN/negative/infinite: not a level
            }
            for (int k = 0; k < levels.length; k++) { // highest level first
                if (x >= levels[k]) {
                    s.above[k] = true;
                } else if (s.above[k] && !s.announced[k]) {
                    s.announced[k] = true;
                    s.remaining--;
                    out.accept(event(r, s.name, levels[k], x));
                }
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
            s.reset();
        }
    }
}
