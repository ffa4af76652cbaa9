package dev.watcher.model;

import java.util.Locale;

/** How urgent an event is. The lowercase {@link #id()} is what the timeline, rules and notices carry. */
public enum Severity {
    INFO, WARNING, CRITICAL;

    public String id() {
        return name().toLowerCase(Locale.ROOT);
    }

    /** Parses {@code info}, {@code warning} or {@code critical}; null when the text is none of them. */
    public static Severity fromId(String id) {
        if (id == null) {
            return null;
        }
        for (Severity s : values()) {
            if (s.id().equals(id.trim().toLowerCase(Locale.ROOT))) {
                return s;
            }
        }
        return null;
    }

    public boolean atLeast(Severity other) {
        return compareTo(other) >= 0;
    }
}
