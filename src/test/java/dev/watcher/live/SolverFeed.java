package dev.watcher.live;

import dev.watcher.model.IterationRecord;
import dev.watcher.model.Samples;
import java.util.List;

/**
 * Records of an invented steady case (a heat-exchanger header) as its log would give them: residuals
 * falling geometrically with a little ripple, one monitor creeping towards its final value. Demo data only:
 * no test checks numbers derived from it, only that what went in comes out.
 */
final class SolverFeed {

    static final List<String> EQUATIONS = List.of("cont", "mom-x", "mom-y", "temp");
    static final List<String> MONITORS = List.of("outlet-temp");

    private SolverFeed() {
    }

    static IterationRecord record(long iter) {
        double[] res = new double[EQUATIONS.size()];
        for (int i = 0; i < res.length; i++) {
            res[i] = (0.5 / (i + 1)) * Math.pow(0.995, iter) * (1 + 0.2 * Math.sin(iter * 0.3 + i));
        }
        double[] mon = {341.0 - 20.0 * Math.exp(-iter / 150.0)};
        return IterationRecord.steady(iter, new Samples(EQUATIONS, res), new Samples(MONITORS, mon));
    }
}
