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
