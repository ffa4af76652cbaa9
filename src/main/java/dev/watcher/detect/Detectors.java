package dev.watcher.detect;

import java.util.ArrayList;
import java.util.List;

/**
 * The registry of the standard detectors: one line per detector. The daemon and {@code replay} run every
 * detector listed here, in this order, for each run.
 */
public final class Detectors {

    private Detectors() {
    }

    /**
     * The detectors of {@link #standard} from this index on share no state with the ones before it (the
     * record's logarithms and the rise trackers' cores are shared only among the first ones). A caller may
     * run the two parts on two threads, provided each part sees every record and segment in order and, per
     * record, the first part's detections are passed on before the second part's: the detections and their
     * order are then those of one thread.
     */
    public static final int SECOND_LANE_FROM = 4;

    /** A fresh set of detectors for one run, reading their parameters from {@code settings}. */
    public static List<Detector> standard(DetectSettings settings) {
        List<Detector> all = new ArrayList<>();
        ResidualLogs logs = new ResidualLogs(); // log10 of each record's residuals, computed once per record
        // one line per detector, e.g. all.add(new NonFiniteDetector(settings));
        all.add(new NonFiniteDetector(settings));
        all.add(new ResidualLevelDetector(settings));
        all.add(new SingleEquationBlowupDetector(settings, logs));
        all.add(new FamilyDivergenceDetector(settings, logs));
        all.add(new StalledOscillationDetector(settings));
        // the two unsteady detectors split the run into time steps once (each keeps its own splitter when
        // their jump_decades differ)
        TimeSteps steps = TimeSteps.shared(RisingPeaksDetector.jumpDecades(settings));
        all.add(new RisingPeaksDetector(settings, steps));
        all.add(new InnerStallDetector(settings, steps));
        all.add(new MonitorSettledDetector(settings));
        all.add(new MonitorPeriodicDetector(settings));
        all.add(new ConvergedDetector(settings));
        return all;
    }
}
