package dev.watcher.detect;

import dev.watcher.model.Detection;
import dev.watcher.model.DetectionState;
import dev.watcher.model.IterationRecord;
import java.util.ArrayList;
import java.util.List;
import java.util.Optional;

/** Feeds records through detectors and keeps what they said. */
final class Harness {

    final List<Detection> detections = new ArrayList<>();

    static Harness run(List<IterationRecord> records, Detector... detectors) {
        Harness h = new Harness();
        for (IterationRecord r : records) {
            for (Detector d : detectors) {
                d.observe(r, h.detections::add);
            }
        }
        return h;
    }

    List<Detection> of(String pattern) {
        return detections.stream().filter(d -> d.pattern().equals(pattern)).toList();
    }

    Optional<Detection> firstOpen(String pattern) {
        return detections.stream().filter(d -> d.pattern().equals(pattern) && d.state() == DetectionState.OPEN)
                .findFirst();
    }
}
