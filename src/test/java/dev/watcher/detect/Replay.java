package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.IterationRecord;
import java.util.ArrayList;
import java.util.List;

/** Test harness: feeds records to detectors in order, announcing segments, and collects what comes out. */
final class Replay {
    private Replay() {
    }

    static List<Detection> run(List<Detector> detectors, List<IterationRecord> records) {
        List<Detection> out = new ArrayList<>();
        int segment = records.isEmpty() ? 0 : records.get(0).segment();
        for (IterationRecord r : records) {
            if (r.segment() != segment) {
                segment = r.segment();
                for (Detector d : detectors) {
                    d.segment(segment, r.iter(), out::add);
                }
            }
            for (Detector d : detectors) {
                d.observe(r, out::add);
            }
        }
        return out;
    }

    static List<Detection> run(Detector detector, List<IterationRecord> records) {
        return run(List.of(detector), records);
    }

    static List<Detection> standard(List<IterationRecord> records) {
        return run(Detectors.standard(DetectSettings.defaults()), records);
    }
}
