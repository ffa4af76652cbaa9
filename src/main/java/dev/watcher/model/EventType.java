package dev.watcher.model;

import java.util.Locale;

/** The four types of timeline event. */
public enum EventType {
    DETECTION, NOTICE, ACTION, RUN;

    public String id() {
        return name().toLowerCase(Locale.ROOT);
    }

    public static EventType fromId(String id) {
        for (EventType t : values()) {
            if (t.id().equals(id)) {
                return t;
            }
        }
        return null;
    }
}
