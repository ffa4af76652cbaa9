package dev.watcher.rules;

import dev.watcher.model.Detection;
import dev.watcher.model.Notice;
import dev.watcher.model.StopRequest;
import java.util.List;

/**
 * What the rules make of one detection.
 *
 * @param detection the detection with the severity and remedy the rules give it (what the timeline records)
 * @param notices   notices due now (possibly about earlier detections whose wait ended); empty while catching up
 * @param stop      a stop the rules allow for this detection, or null; acting on it is the action stage's call
 */
public record Decision(Detection detection, List<Notice> notices, StopRequest stop) {

    public Decision {
        notices = notices == null ? List.of() : List.copyOf(notices);
    }
}
