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
    /** One bit per level. */
    private final long all;

    ResidualLevelDetector(DetectSettings settings) {
        levels = parseLevels(settings.text(LEVELS, "1e-3,1e-4,1e-5,1e-6"));
        if (levels.length > 63) {
            throw new IllegalArgumentException("at most 63 residual levels, found " + levels.length);
        }
        all = (1L << levels.length) - 1;
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
        /** Bit k: the residual was at or above levels[k] earlier in this segment. */
        long above;
        /** Bit k: the fall below levels[k] was announced in this segment. */
        long announced;

        State(String name) {
            this.name = name;
        }

        void reset() {
            above = 0;
            announced = 0;
        }
    }

    @Override
    public void observe(IterationRecord r, Consumer<Detection> out) {
        Samples res = r.residuals();
        double[] v = res.values();
        List<State> slots = states.slots(res.names());
        double[] lv = levels;
        for (int i = 0; i < v.length; i++) {
            double x = v[i];
            State s = slots.get(i);
            if (s.announced == all || !(x >= 0) || x == Double.POSITIVE_INFINITY) {
                continue; // all levels announced, or NaN/negative/infinite: not a level
            }
            // levels descend: x is below levels[0..f) and at or above levels[f..]
            int f = 0;
            while (f < lv.length && x < lv[f]) {
                f++;
            }
            long below = (1L << f) - 1;
            long fresh = s.above & below & ~s.announced;
            s.above |= all & ~below;
            if (fresh != 0) {
                s.announced |= fresh;
                for (int k = 0; k < f; k++) { // highest level first
                    if ((fresh & (1L << k)) != 0) {
                        out.accept(event(r, s.name, lv[k], x));
                    }
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
