package dev.watcher.model;

import java.util.Locale;

/** The closed set of states of a detection event. */
public enum DetectionState {
    OPEN, RESOLVED, INFO;

    public String id() {
        return name().toLowerCase(Locale.ROOT);
    }
}
